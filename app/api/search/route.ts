import { db } from "@/db/client";
import { replicateMeanUncertainty } from "@/db/queries/lighting";
import { resolveSolvent, searchByColour } from "@/db/queries/search";
import { isTie } from "@/lib/color/uncertainty";
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
  // ± ΔE00 of each result's replicate mean; a result whose distance differs from the one before it by
  // less than their combined uncertainty is marked as a tie (its rank over the other is not real).
  const withU = results.map((r) => ({
    r,
    u: replicateMeanUncertainty(handle, { dyeId: r.dye.id, solvent: r.condition.solvent, acidBase: r.condition.acidBase, pH: r.condition.pH, replicates: r.replicates, spreadDeltaE00: r.spreadDeltaE00 }),
  }));
  return {
    target: { lab: query.target.lab, ...(word ? { word: word.word } : {}) },
    results: withU.map(({ r, u: uncertaintyDeltaE00 }, i) => ({
      dye: r.dye,
      deltaE00: r.deltaE00,
      uncertaintyDeltaE00,
      tieWithPrevious: i > 0 && uncertaintyDeltaE00 !== null && withU[i - 1].u !== null && isTie({ deltaE00: r.deltaE00, uncertaintyDeltaE00 }, { deltaE00: withU[i - 1].r.deltaE00, uncertaintyDeltaE00: withU[i - 1].u }),
      lab: r.lab,
      condition: r.condition,
      predicted: r.predicted,
      replicates: r.replicates,
      spreadDeltaE00: r.spreadDeltaE00,
      measurements: r.measurements,
    })),
  };
});
