/**
 * Search with predictions: the measured ranking (exact top-`limit` dyes, one hit each) merged with the
 * dyes' predicted colours, ranked exactly over the union. Exact because a dye left out of the measured
 * top-`limit` has at least `limit` dyes with a measured colour at least as close, so only its predicted
 * colours could bring it back, and every prediction is scored here (there are few: dyes × solvents).
 */
import { ciede2000 } from "../search/ciede2000";
import type { Lab } from "../color/types";

export type PredictedColour = { dye: { id: string; code: string; name: string }; lab: Lab; uncertaintyDeltaE00: number };
export type PredictedHit<P extends PredictedColour> = P & { deltaE00: number; predicted: true };

export function rankWithPredictions<M extends { dye: { id: string }; deltaE00: number }, P extends PredictedColour>(
  target: Lab,
  measured: readonly M[],
  predictions: readonly P[],
  limit: number,
): (M | PredictedHit<P>)[] {
  const best = new Map<string, M | PredictedHit<P>>();
  for (const m of measured) best.set(m.dye.id, m);
  for (const p of predictions) {
    const d = ciede2000(target[0], target[1], target[2], p.lab[0], p.lab[1], p.lab[2]);
    const current = best.get(p.dye.id);
    if (!current || d < current.deltaE00) best.set(p.dye.id, { ...p, deltaE00: d, predicted: true });
  }
  return [...best.values()].sort((x, y) => x.deltaE00 - y.deltaE00).slice(0, limit);
}
