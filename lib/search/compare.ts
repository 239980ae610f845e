import type { Lab } from "@/lib/color/types";
import { ciede2000 } from "./ciede2000";

/** Pairwise CIEDE2000 between colours; null where either colour is missing. Symmetric, zero diagonal. */
export function deltaE00Matrix(labs: readonly (Lab | null)[]): (number | null)[][] {
  return labs.map((x, i) => labs.map((y, j) => (x && y ? (i === j ? 0 : ciede2000(x[0], x[1], x[2], y[0], y[1], y[2])) : null)));
}

/** Component-wise mean of CIELAB colours (replicates of one condition). */
export function meanLab(labs: readonly Lab[]): Lab {
  const n = labs.length;
  return [labs.reduce((s, l) => s + l[0], 0) / n, labs.reduce((s, l) => s + l[1], 0) / n, labs.reduce((s, l) => s + l[2], 0) / n];
}

/** Parses `dyes=a,b,c` (plus an optional `add`) into at most `max` distinct codes, in order. */
export function parseDyeCodes(dyes: string | undefined, add: string | undefined, max = 6): { codes: string[]; dropped: number } {
  const all = [...(dyes ?? "").split(","), add ?? ""].map((c) => c.trim()).filter(Boolean);
  const unique = [...new Set(all)];
  return { codes: unique.slice(0, max), dropped: Math.max(0, unique.length - max) };
}
