/**
 * Derivative-free minimisation by the downhill simplex method of J. A. Nelder & R. Mead, "A simplex
 * method for function minimization", Computer Journal 7 (1965) 308–313, with the standard coefficients
 * (reflection 1, expansion 2, contraction ½, shrink ½) as analysed by J. C. Lagarias, J. A. Reeds,
 * M. H. Wright & P. E. Wright, SIAM J. Optim. 9 (1998) 112–147.
 *
 * Used for the few-parameter colour fits (an absorption band to a CIELAB colour) whose objective,
 * a CIEDE2000 difference, has no convenient derivative. Bounds are the caller's job (clamp or penalise
 * inside `f`). Stops when the simplex's spread of values falls below `fTol` and its size below `xTol`,
 * or after `maxIterations`.
 */
export type NelderMeadResult = { x: number[]; value: number; iterations: number; converged: boolean };

export function nelderMead(
  f: (x: readonly number[]) => number,
  start: readonly number[],
  opts: { step?: number | readonly number[]; maxIterations?: number; fTol?: number; xTol?: number } = {},
): NelderMeadResult {
  const n = start.length;
  const steps = typeof opts.step === "number" || opts.step === undefined ? Array(n).fill(opts.step ?? 0.1) : [...opts.step];
  const maxIterations = opts.maxIterations ?? 200 * n;
  const fTol = opts.fTol ?? 1e-8;
  const xTol = opts.xTol ?? 1e-6;

  const simplex: number[][] = [[...start]];
  for (let i = 0; i < n; i++) {
    const v = [...start];
    v[i] += steps[i];
    simplex.push(v);
  }
  const values = simplex.map((v) => f(v));
  const order = () => {
    const idx = simplex.map((_, i) => i).sort((p, q) => values[p] - values[q]);
    const s = idx.map((i) => simplex[i]);
    const v = idx.map((i) => values[i]);
    for (let i = 0; i <= n; i++) {
      simplex[i] = s[i];
      values[i] = v[i];
    }
  };
  const combine = (a: readonly number[], b: readonly number[], t: number) => a.map((ai, i) => ai + t * (b[i] - ai));

  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
    order();
    const spreadF = Math.abs(values[n] - values[0]);
    let spreadX = 0;
    for (let i = 1; i <= n; i++) for (let j = 0; j < n; j++) spreadX = Math.max(spreadX, Math.abs(simplex[i][j] - simplex[0][j]));
    if (spreadF <= fTol && spreadX <= xTol) {
      converged = true;
      break;
    }
    iterations++;
    const centroid = Array(n).fill(0);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) centroid[j] += simplex[i][j] / n;
    const worst = simplex[n];
    const reflected = combine(centroid, worst, -1);
    const fr = f(reflected);
    if (fr < values[0]) {
      const expanded = combine(centroid, worst, -2);
      const fe = f(expanded);
      if (fe < fr) {
        simplex[n] = expanded;
        values[n] = fe;
      } else {
        simplex[n] = reflected;
        values[n] = fr;
      }
      continue;
    }
    if (fr < values[n - 1]) {
      simplex[n] = reflected;
      values[n] = fr;
      continue;
    }
    // Contraction: outside if the reflection improved on the worst point, inside otherwise.
    const outside = fr < values[n];
    const contracted = outside ? combine(centroid, reflected, 0.5) : combine(centroid, worst, 0.5);
    const fc = f(contracted);
    if (fc < (outside ? fr : values[n])) {
      simplex[n] = contracted;
      values[n] = fc;
      continue;
    }
    for (let i = 1; i <= n; i++) {
      simplex[i] = combine(simplex[0], simplex[i], 0.5);
      values[i] = f(simplex[i]);
    }
  }
  order();
  return { x: simplex[0], value: values[0], iterations, converged };
}

/**
 * Minimum of a function of one variable on [lo, hi] by golden-section search (J. Kiefer, "Sequential
 * minimax search for a maximum", Proc. AMS 4 (1953) 502–506). Assumes one minimum inside the bracket.
 */
export function goldenSection(f: (x: number) => number, lo: number, hi: number, tol = 1e-3): { x: number; value: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let a = lo;
  let b = hi;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = f(c);
  let fd = f(d);
  while (b - a > tol) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = f(d);
    }
  }
  return fc < fd ? { x: c, value: fc } : { x: d, value: fd };
}
