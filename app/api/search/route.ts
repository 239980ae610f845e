import { db } from "@/db/client";
import { resolveSolvent, searchByColour } from "@/db/queries/search";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { matchesColourWord } from "@/lib/search/colour-words";
import { colourSearchQuerySchema } from "@/lib/search/query";

/**
 * GET /api/search?lab=L,a,b | hex=rrggbb | word=violet &medium=&acidBase=&solvent=&phMin=&phMax=&limit=
 * One result per dye: its condition whose mean colour (of the accepted replicates in that solvent,
 * acid/base state and pH) is closest to the target, ranked exactly by CIEDE2000 (D65), with the
 * replicate count and spread. See ../shared/CONTRACT.md.
 */
export const GET = apiRoute({ access: ANY_ROLE, query: colourSearchQuerySchema }, async ({ query }) => {
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
  return {
    target: { lab: query.target.lab, ...(word ? { word: word.word } : {}) },
    results: results.map((r) => ({
      dye: r.dye,
      deltaE00: r.deltaE00,
      lab: r.lab,
      condition: r.condition,
      predicted: r.predicted,
      replicates: r.replicates,
      spreadDeltaE00: r.spreadDeltaE00,
      measurements: r.measurements,
    })),
  };
});
