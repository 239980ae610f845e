import { db } from "@/db/client";
import { shiftCandidates } from "@/db/queries/search";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { deltaE00ForViewer } from "@/lib/color/vision";
import { shiftSearchQuerySchema } from "@/lib/search/query";
import { scoreShifts } from "@/lib/search/shift";

/**
 * GET /api/search/shift?aMedium=&aAcidBase=&bMedium=&bAcidBase=&from=&to=&minShift=&sameSolvent=&viewers=protan,deutan&viewerMinShift=&limit=
 * Dyes ranked by how well their colour change from condition A to condition B fits the request
 * (lib/search/shift; the largest shifts ranked by ΔEOK, ΔE00 shown too); dyes that fail the minimum shift or a viewer check are listed with the reason.
 */
export const GET = apiRoute({ access: ANY_ROLE, query: shiftSearchQuerySchema }, async ({ query }) => {
  const { dyes, candidates } = shiftCandidates(db(), { a: query.a, b: query.b });
  const { results, failures } = scoreShifts(candidates, query.query, deltaE00ForViewer);
  const side = (c: (typeof results)[number]["a"]) => ({
    lab: c.lab,
    measurementId: c.payload.measurementId,
    condition: { solvent: c.payload.solvent, medium: c.payload.medium, acidBase: c.payload.acidBase, pH: c.payload.ph },
  });
  return {
    results: results.slice(0, query.limit).map((r) => ({
      dye: dyes.get(r.dyeId)!,
      shift: r.shift,
      shiftDeltaEOK: r.shiftOK,
      fromDeltaE00: r.fromDeltaE00,
      toDeltaE00: r.toDeltaE00,
      a: side(r.a),
      b: side(r.b),
      viewers: r.viewers,
      predicted: false,
    })),
    failures: failures.map((f) => ({ dye: dyes.get(f.dyeId)!, reason: f.reason, shift: f.best?.shift ?? null, viewers: f.best?.viewers ?? [] })),
  };
});
