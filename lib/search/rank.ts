import { deltaE00 } from "@/lib/color/difference";
import type { Lab } from "@/lib/color/types";

export type Candidate<T> = { dyeId: string; lab: Lab; payload: T };
export type Ranked<T> = Candidate<T> & { deltaE00: number };

/**
 * Exact ranking by CIEDE2000 to a target, one result per dye (its closest colour), ascending.
 * Brute force over the candidates; ties are broken by dye id so the order is stable.
 */
export function rankByColourExhaustive<T>(target: Lab, candidates: Iterable<Candidate<T>>, limit: number): Ranked<T>[] {
  const best = new Map<string, Ranked<T>>();
  for (const c of candidates) {
    const d = deltaE00(target, c.lab);
    const prev = best.get(c.dyeId);
    if (!prev || d < prev.deltaE00) best.set(c.dyeId, { ...c, deltaE00: d });
  }
  return [...best.values()].sort((x, y) => x.deltaE00 - y.deltaE00 || (x.dyeId < y.dyeId ? -1 : 1)).slice(0, limit);
}
