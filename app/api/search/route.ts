import { db } from "@/db/client";
import { replicateMeanUncertainty } from "@/db/queries/lighting";
import { resolveSolvent, searchByColour } from "@/db/queries/search";
import { isTie } from "@/lib/color/uncertainty";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { matchesColourWord } from "@/lib/search/colour-words";
import { colourSearchQuerySchema } from "@/lib/search/query";
import { z } from "zod";
import { searchPredictions } from "@/db/queries/models";
import { rankWithPredictions } from "@/lib/models/predicted-ranking";

/** `predicted=include` adds solvent-model predictions (default: measured colours only). */
const predictedSchema = z.object({
  predicted: z.enum(["include", "exclude"], { error: "predicted must be include or exclude." }).optional().default("exclude"),
});

/**
 * GET /api/search?lab=L,a,b | hex=rrggbb | word=violet &medium=&acidBase=&solvent=&phMin=&phMax=&limit=
 * One result per dye: its condition whose mean colour (of the accepted replicates in that solvent,
 * acid/base state and pH) is closest to the target, ranked exactly by CIEDE2000 (D65), with the
 * replicate count and spread. See ../shared/CONTRACT.md.
 */
export const GET = apiRoute({ access: ANY_ROLE, query: colourSearchQuerySchema.and(predictedSchema) }, async ({ query }) => {
  const handle = db();
  let solventId: string | undefined;
  if (query.solvent) {
    const solvent = resolveSolvent(handle, { text: query.solvent });
    if (!solvent) throw new AppError("invalid_input", `solvent: no solvent called "${query.solvent}"; use a name from the solvent table, e.g. Methanol.`);
    solventId = solvent.id;
  }
  const word = query.target.word;
  const { results } = searchByColour(handle, {
    target: query.target.lab,
    filter: { ...query.filter, solventId },
    limit: query.limit,
    accept: word ? (l, a, b) => matchesColourWord(word, l, a, b) : undefined,
  });
  const measured = results.map((r) => ({
    dye: r.dye,
    deltaE00: r.deltaE00,
    lab: r.lab,
    condition: r.condition,
    predicted: r.predicted,
    replicates: r.replicates,
    spreadDeltaE00: r.spreadDeltaE00,
    measurements: r.measurements,
  }));
  const ranked =
    query.predicted === "include"
      ? rankWithPredictions(query.target.lab, measured, searchPredictions(handle, { filter: { ...query.filter, solventId }, accept: word ? (l, a, b) => matchesColourWord(word, l, a, b) : undefined }), query.limit)
      : measured;
  // ± ΔE00 of each result (a measured replicate mean's, or a prediction's own); a result whose distance
  // differs from the one before it by less than their combined uncertainty is marked as a tie.
  const withU = ranked.map((r) => ({
    ...r,
    uncertaintyDeltaE00:
      "uncertaintyDeltaE00" in r && typeof r.uncertaintyDeltaE00 === "number"
        ? r.uncertaintyDeltaE00
        : !r.predicted && "spreadDeltaE00" in r
          ? replicateMeanUncertainty(handle, { dyeId: r.dye.id, solvent: r.condition.solvent, acidBase: r.condition.acidBase, pH: r.condition.pH, replicates: r.replicates, spreadDeltaE00: r.spreadDeltaE00 })
          : null,
  }));
  const final = withU.map((r, i) => ({
    ...r,
    tieWithPrevious: i > 0 && r.uncertaintyDeltaE00 !== null && withU[i - 1].uncertaintyDeltaE00 !== null && isTie(r, withU[i - 1]),
  }));
  return { target: { lab: query.target.lab, ...(word ? { word: word.word } : {}) }, results: final };
});
