import { db } from "@/db/client";
import { resolveSolvent, searchByColour, searchMeansReady } from "@/db/queries/search";
import { isTie } from "@/lib/color/uncertainty";
import { apiRoute, parseInput } from "@/lib/auth/guard";
import { dyesChangingColourWithin, searchByColourAmongDyes, transitionSummary } from "@/db/queries/ph-search";
import { conditionFilterSchema } from "@/lib/search/filters";
import { mediaOf, PH_RANGE_RULE, phRangeQuerySchema } from "@/lib/search/ph-range";
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

const rawQuery = z.record(z.string(), z.string());
const hasTarget = (raw: Record<string, string>) => ["hex", "lab", "word"].some((k) => (raw[k] ?? "").trim() !== "");

/** `phFrom=x&phTo=y` without a target colour: the dyes whose colour changes within pH x–y, best-centred first. */
const transitionQuerySchema = conditionFilterSchema.and(
  z.object({ limit: z.coerce.number({ error: "limit must be a whole number from 1 to 200." }).int("limit must be a whole number from 1 to 200.").min(1, "limit must be a whole number from 1 to 200.").max(200, "limit must be a whole number from 1 to 200.").optional().default(20) }),
);

function solventIdOf(handle: ReturnType<typeof db>, text: string | undefined): string | undefined {
  if (!text?.trim()) return undefined;
  const solvent = resolveSolvent(handle, { text: text.trim() });
  if (!solvent) throw new AppError("invalid_input", `solvent: no solvent called "${text}"; use a name from the solvent table, e.g. Methanol.`);
  return solvent.id;
}

/**
 * GET /api/search?lab=L,a,b | hex=rrggbb | word=violet &medium=&acidBase=&solvent=&phMin=&phMax=&limit= [&phFrom=x&phTo=y]
 * One result per dye: its condition whose mean colour (of the accepted replicates in that solvent,
 * acid/base state and pH) is closest to the target, ranked exactly by CIEDE2000 (D65), with the
 * replicate count and spread. See ../shared/CONTRACT.md.
 * With phFrom and phTo only the dyes whose stored pKa fit changes colour within that pH range take part
 * (rule in lib/search/ph-range.ts), each with `phTransition`; without a target they are ordered by how
 * centred their transition is in the range.
 */
export const GET = apiRoute({ access: ANY_ROLE, query: rawQuery }, async ({ query: raw }) => {
  const handle = db();
  const phRange = parseInput(phRangeQuerySchema, raw);
  if (phRange && !hasTarget(raw)) {
    const q = parseInput(transitionQuerySchema, raw);
    const hits = [...dyesChangingColourWithin(handle, { range: phRange, solventId: solventIdOf(handle, q.solvent), media: mediaOf(q.medium) }).values()].slice(0, q.limit);
    return { target: null, phRange: { ...phRange, rule: PH_RANGE_RULE }, results: hits.map((h) => ({ dye: h.dye, predicted: false, phTransition: transitionSummary(h) })) };
  }
  const query = parseInput(colourSearchQuerySchema.and(predictedSchema), raw);
  const solventId = solventIdOf(handle, query.solvent);
  const within = phRange ? dyesChangingColourWithin(handle, { range: phRange }) : null;
  const word = query.target.word;
  const accept = word ? (l: number, a: number, b: number) => matchesColourWord(word, l, a, b) : undefined;
  // Just after start-up the means may still be building in the background: wait for that build
  // without holding the event loop (other requests go on meanwhile).
  if (!within) await searchMeansReady(handle);
  const results = within
    ? searchByColourAmongDyes(handle, { target: query.target.lab, filter: { ...query.filter, solventId }, dyeIds: [...within.keys()], limit: query.limit, accept })
    : searchByColour(handle, { target: query.target.lab, filter: { ...query.filter, solventId }, limit: query.limit, accept }).results;
  const measured = results.map((r) => ({
    dye: r.dye,
    deltaE00: r.deltaE00,
    lab: r.lab,
    condition: r.condition,
    predicted: r.predicted,
    replicates: r.replicates,
    spreadDeltaE00: r.spreadDeltaE00,
    measurements: r.measurements,
    uncertaintyDeltaE00: r.uncertaintyDeltaE00,
  }));
  const ranked =
    query.predicted === "include"
      ? rankWithPredictions(query.target.lab, measured, searchPredictions(handle, { filter: { ...query.filter, solventId }, accept }).filter((p) => !within || within.has(p.dye.id)), query.limit)
      : measured;
  // ± ΔE00 of each result (a measured replicate mean's, carried by the search, or a prediction's own); a
  // result whose distance differs from the one before it by less than their combined uncertainty is a tie.
  const final = ranked.map((r, i) => ({
    ...r,
    tieWithPrevious: i > 0 && r.uncertaintyDeltaE00 !== null && ranked[i - 1].uncertaintyDeltaE00 !== null && isTie(r, ranked[i - 1]),
  }));
  if (!within) return { target: { lab: query.target.lab, ...(word ? { word: word.word } : {}) }, results: final };
  return {
    target: { lab: query.target.lab, ...(word ? { word: word.word } : {}) },
    phRange: { ...phRange, rule: PH_RANGE_RULE },
    results: final.map((r) => ({ ...r, phTransition: transitionSummary(within.get(r.dye.id)!) })),
  };
});
