/**
 * Binary solvent mixtures: a dye's band position (or any property linear in energy) against the mole
 * fraction x₂ of the second solvent.
 *
 * Preferential solvation, two-step model of M. Rosés, C. Ràfols, J. Ortega & E. Bosch 1995, "Solute–solvent
 * and solvent–solvent interactions in binary solvent mixtures. Part 1", J. Chem. Soc., Perkin Trans. 2,
 * 1607–1615 (and Bosch & Rosés 1992, J. Chem. Soc., Faraday Trans. 88, 3541):
 *
 *   Y = (Y₁x₁² + Y₂·f₂/₁·x₂² + Y₁₂·f₁₂/₁·x₁x₂) / (x₁² + f₂/₁·x₂² + f₁₂/₁·x₁x₂)
 *
 * With f₂/₁ = 1, f₁₂/₁ = 2 and Y₁₂ = (Y₁ + Y₂)/2 the solvation shell has the bulk composition and Y reduces to
 * ideal mixing, Y = x₁Y₁ + x₂Y₂.
 */

export type PreferentialSolvation = {
  /** Property in the neat first solvent (x₂ = 0) and the neat second solvent (x₂ = 1). */
  y1: number;
  y2: number;
  /** Property of the 1–2 mixed solvation shell. */
  y12: number;
  /** f₂/₁: preference for solvent 2 over solvent 1. */
  f21: number;
  /** f₁₂/₁: preference for the mixed 1–2 species over solvent 1. */
  f121: number;
};

/** Bosch–Rosés two-step preferential solvation at mole fraction x₂ of the second solvent (0 ≤ x₂ ≤ 1). */
export function boschRosesValue(p: PreferentialSolvation, x2: number): number {
  if (!(x2 >= 0 && x2 <= 1)) throw new RangeError("A mole fraction lies between 0 and 1");
  const x1 = 1 - x2;
  const num = p.y1 * x1 * x1 + p.y2 * p.f21 * x2 * x2 + p.y12 * p.f121 * x1 * x2;
  const den = x1 * x1 + p.f21 * x2 * x2 + p.f121 * x1 * x2;
  return num / den;
}

/** Ideal mixing of the property itself (not of α, β, π*): Y = (1 − x₂)·Y₁ + x₂·Y₂. */
export function idealMixingValue(y1: number, y2: number, x2: number): number {
  if (!(x2 >= 0 && x2 <= 1)) throw new RangeError("A mole fraction lies between 0 and 1");
  return (1 - x2) * y1 + x2 * y2;
}

export type BlendPoint = { x2: number; value: number };

export type BoschRosesFit = PreferentialSolvation & {
  n: number;
  rmse: number;
};

/** Nelder–Mead on a small vector (Nelder & Mead 1965, Comput. J. 7, 308–313); standard coefficients. */
function nelderMead(f: (x: number[]) => number, start: number[], step: number[], iterations = 2000): number[] {
  const n = start.length;
  let simplex = [start, ...start.map((_, i) => start.map((v, j) => (i === j ? v + step[j] : v)))];
  let values = simplex.map(f);
  for (let it = 0; it < iterations; it++) {
    const order = values.map((v, i) => [v, i] as const).sort((a, b) => a[0] - b[0]).map(([, i]) => i);
    simplex = order.map((i) => simplex[i]);
    values = order.map((i) => values[i]);
    if (Math.abs(values[n] - values[0]) < 1e-12 * (1 + Math.abs(values[0]))) break;
    const centroid = start.map((_, j) => simplex.slice(0, n).reduce((s, x) => s + x[j], 0) / n);
    const at = (t: number) => centroid.map((c, j) => c + t * (simplex[n][j] - c));
    const reflected = at(-1);
    const fr = f(reflected);
    if (fr < values[0]) {
      const expanded = at(-2);
      const fe = f(expanded);
      [simplex[n], values[n]] = fe < fr ? [expanded, fe] : [reflected, fr];
    } else if (fr < values[n - 1]) {
      [simplex[n], values[n]] = [reflected, fr];
    } else {
      const contracted = fr < values[n] ? at(-0.5) : at(0.5);
      const fc = f(contracted);
      if (fc < Math.min(fr, values[n])) [simplex[n], values[n]] = [contracted, fc];
      else {
        simplex = simplex.map((x) => x.map((v, j) => simplex[0][j] + 0.5 * (v - simplex[0][j])));
        values = simplex.map(f);
      }
    }
  }
  return simplex[values.indexOf(Math.min(...values))];
}

/**
 * Fits f₂/₁, f₁₂/₁ and Y₁₂ of the Bosch–Rosés model to ≥ 3 blend compositions, with Y₁ and Y₂ fixed at the
 * neat-solvent values (measured or predicted). The preference factors are fitted on a log scale so they
 * stay positive.
 */
export function fitBoschRoses(points: readonly BlendPoint[], y1: number, y2: number): BoschRosesFit {
  const inner = points.filter((p) => p.x2 > 0 && p.x2 < 1);
  if (inner.length < 3) throw new RangeError("The preferential-solvation fit needs at least three blend compositions");
  const model = (v: number[]): PreferentialSolvation => ({ y1, y2, f21: Math.exp(v[0]), f121: Math.exp(v[1]), y12: v[2] });
  const sse = (v: number[]) => points.reduce((s, p) => s + (boschRosesValue(model(v), p.x2) - p.value) ** 2, 0);
  const scale = Math.max(1, Math.abs(y2 - y1));
  const best = nelderMead(sse, [0, Math.log(2), (y1 + y2) / 2], [0.5, 0.5, 0.25 * scale]);
  return { ...model(best), n: points.length, rmse: Math.sqrt(sse(best) / points.length) };
}
