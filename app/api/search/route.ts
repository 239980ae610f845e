import { db } from "@/db/client";
import { resolveSolvent, searchByColour } from "@/db/queries/search";
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
 * One result per dye (its accepted colour closest to the target under the condition), ranked exactly
 * by CIEDE2000 (D65). See ../shared/CONTRACT.md.
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
      measurementId: r.measurementId,
      measurements: r.measurements,
  }));
  const ranked =
    query.predicted === "include"
      ? rankWithPredictions(query.target.lab, measured, searchPredictions(handle, { filter: { ...query.filter, solventId }, accept: word ? (l, a, b) => matchesColourWord(word, l, a, b) : undefined }), query.limit)
      : measured;
  return { target: { lab: query.target.lab, ...(word ? { word: word.word } : {}) }, results: ranked };
});
