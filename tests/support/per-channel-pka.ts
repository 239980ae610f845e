/**
 * The per-channel pKa fit Solvatlas used before the forward model (lib/color/pka.ts): Beer–Lambert applied
 * to each broad linear-sRGB channel as if it were one wavelength. Kept only so the tests can show, on
 * series generated the physical way, how far it misses. Not used by the product.
 */
import { labToLinearSrgb, linearSrgbToLab } from "@/lib/color/convert";
import { deltaE00 } from "@/lib/color/difference";
import { ColorInputError } from "@/lib/color/errors";
import type { Lab, Vec3 } from "@/lib/color/types";

/** One vial of a pH series: its pH and its colour, CIELAB D65. */
export type PhPoint = { pH: number; lab: Lab };

export type PkaFit = {
  pKa: number;
  /** Standard error of pKa from the fit's covariance (Gauss–Newton approximation). */
  pKaStdErr: number;
  /** pH where the base form goes from 10 % to 90 %: pKa ∓ log10 9. */
  transition: [number, number];
  acidLab: Lab;
  baseLab: Lab;
  /** Root mean square ΔE00 between each vial and the fitted colour at its pH. */
  rmsDeltaE00: number;
};

/** Smallest linear value taken into the logarithm: a channel darker than this is treated as this dark. */
const MIN_LINEAR = 1e-4;
/** Below this ΔE00 between the two forms the series shows no colour change to fit (a design choice). */
const MIN_FORM_DIFFERENCE = 3;
const LOG10_9 = Math.log10(9);

/** "Absorbance" of each linear sRGB channel relative to the blank vial: A = −log10(rgb / blank). */
function absorbanceOf(lab: Lab, blank: Vec3): Vec3 {
  const rgb = labToLinearSrgb(lab, "D65");
  return [0, 1, 2].map((c) => -Math.log10(Math.max(MIN_LINEAR, rgb[c]) / blank[c])) as Vec3;
}

function labOfAbsorbance(a: readonly number[], blank: Vec3): Lab {
  return linearSrgbToLab([0, 1, 2].map((c) => blank[c] * 10 ** -a[c]) as Vec3, "D65");
}

/** Base fraction at `pH` for `pKa`: Henderson–Hasselbalch, [A⁻]/([HA] + [A⁻]) = 1 / (1 + 10^(pKa − pH)). */
export function baseFraction(pH: number, pKa: number): number {
  return 1 / (1 + 10 ** (pKa - pH));
}

/** For a fixed pKa the model is linear in the two forms' absorbances: solve those by least squares. */
function formsFor(pKa: number, pHs: readonly number[], abs: readonly Vec3[]): { acid: Vec3; base: Vec3; rss: number } {
  let s00 = 0;
  let s01 = 0;
  let s11 = 0;
  const t0 = [0, 0, 0];
  const t1 = [0, 0, 0];
  const fs = pHs.map((pH) => baseFraction(pH, pKa));
  fs.forEach((f, i) => {
    const g = 1 - f;
    s00 += g * g;
    s01 += g * f;
    s11 += f * f;
    for (let c = 0; c < 3; c++) {
      t0[c] += g * abs[i][c];
      t1[c] += f * abs[i][c];
    }
  });
  const det = s00 * s11 - s01 * s01;
  const acid = [0, 1, 2].map((c) => (s11 * t0[c] - s01 * t1[c]) / det) as Vec3;
  const base = [0, 1, 2].map((c) => (s00 * t1[c] - s01 * t0[c]) / det) as Vec3;
  let rss = 0;
  fs.forEach((f, i) => {
    for (let c = 0; c < 3; c++) rss += (abs[i][c] - ((1 - f) * acid[c] + f * base[c])) ** 2;
  });
  return { acid, base, rss: Number.isFinite(det) && Math.abs(det) > 1e-12 ? rss : Infinity };
}

function invert(m: number[][]): number[][] | null {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r;
    if (Math.abs(a[pivot][col]) < 1e-14) return null;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    const p = a[col][col];
    for (let j = 0; j < 2 * n; j++) a[col][j] /= p;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const factor = a[r][col];
      if (factor !== 0) for (let j = 0; j < 2 * n; j++) a[r][j] -= factor * a[col][j];
    }
  }
  return a.map((row) => row.slice(n));
}

/**
 * Fits one acid–base equilibrium to the colours of a pH series (Henderson–Hasselbalch; see
 * H. N. Po & N. M. Senozan, J. Chem. Educ. 78 (2001) 1499 for the equation and its limits).
 *
 * Colours are mixed where mixing is linear: each vial's CIELAB D65 is turned into linear sRGB and
 * then into an absorbance-like value per channel, A = −log10(rgb / blank), with `blank` the vial
 * with solvent only. By Beer–Lambert at constant total dye, A(pH) = (1 − f) A_acid + f A_base with
 * f = 1 / (1 + 10^(pKa − pH)). For each trial pKa the two forms follow by linear least squares;
 * pKa is found by a grid over the measured pH range ± 1 refined by golden-section search. A broad
 * channel is not a single wavelength, so this is an approximation that holds best for dilute dyes.
 *
 * Refuses fewer than 5 vials, fewer than 4 distinct pH values, no colour change, and a transition
 * outside the measured pH range.
 */
export function fitPkaPerChannel(points: readonly PhPoint[], blankLab: Lab = [100, 0, 0]): PkaFit {
  if (points.length < 5) throw new ColorInputError(`A pKa fit needs at least 5 vials across the pH range and ${points.length} were given; measure more pH values.`);
  if (!points.every((p) => Number.isFinite(p.pH) && p.lab.every(Number.isFinite))) {
    throw new ColorInputError("A vial of the pH series has a value that is not a number; check the data.");
  }
  if (points.some((p) => p.pH < -2 || p.pH > 16)) throw new ColorInputError("A pH in the series lies outside −2 to 16; check the pH column.");
  if (new Set(points.map((p) => p.pH)).size < 4) throw new ColorInputError("The pH series has fewer than 4 different pH values; spread the vials over the transition.");
  if (!(blankLab[0] > 0)) throw new ColorInputError("The blank must have a lightness above 0; give the colour of the vial with solvent only.");
  const blank = labToLinearSrgb(blankLab, "D65");
  if (blank.some((c) => c <= MIN_LINEAR)) {
    throw new ColorInputError("The blank colour has a channel with no light in sRGB; give the colour of the clear vial with solvent only.");
  }
  const pHs = points.map((p) => p.pH);
  const abs = points.map((p) => absorbanceOf(p.lab, blank));
  const lo = Math.min(...pHs);
  const hi = Math.max(...pHs);
  const searchLo = lo - 1;
  const searchHi = hi + 1;

  const step = 0.01;
  let best = searchLo;
  let bestRss = Infinity;
  for (let p = searchLo; p <= searchHi + 1e-9; p += step) {
    const { rss } = formsFor(p, pHs, abs);
    if (rss < bestRss) {
      bestRss = rss;
      best = p;
    }
  }
  // Golden-section refinement within one grid step either side.
  let a = best - step;
  let b = best + step;
  const phi = (Math.sqrt(5) - 1) / 2;
  for (let k = 0; k < 60; k++) {
    const x1 = b - phi * (b - a);
    const x2 = a + phi * (b - a);
    if (formsFor(x1, pHs, abs).rss < formsFor(x2, pHs, abs).rss) b = x2;
    else a = x1;
  }
  const pKa = (a + b) / 2;
  const { acid, base, rss } = formsFor(pKa, pHs, abs);
  const acidLab = labOfAbsorbance(acid, blank);
  const baseLab = labOfAbsorbance(base, blank);
  const change = deltaE00(acidLab, baseLab);
  if (!(change >= MIN_FORM_DIFFERENCE)) {
    throw new ColorInputError(`The colour barely changes across the pH series (ΔE00 ${change.toFixed(1)} between the fitted forms); a pKa cannot be read from it.`);
  }
  if (pKa < lo || pKa > hi) {
    throw new ColorInputError(
      `The fitted pKa ${pKa.toFixed(2)} lies outside the measured pH range ${lo}–${hi}; add vials on that side of the transition.`,
    );
  }

  // Standard error from J of the 3n residuals in the 7 parameters (pKa, A_acid ×3, A_base ×3).
  const jac: number[][] = [];
  pHs.forEach((pH) => {
    const f = baseFraction(pH, pKa);
    const dfdp = -Math.LN10 * f * (1 - f);
    for (let c = 0; c < 3; c++) {
      const row = new Array(7).fill(0);
      row[0] = (base[c] - acid[c]) * dfdp;
      row[1 + c] = 1 - f;
      row[4 + c] = f;
      jac.push(row);
    }
  });
  const jtj = Array.from({ length: 7 }, (_, i) => Array.from({ length: 7 }, (_, j) => jac.reduce((s, r) => s + r[i] * r[j], 0)));
  const cov = invert(jtj);
  const dof = jac.length - 7;
  const pKaStdErr = cov && dof > 0 ? Math.sqrt(Math.max(0, (rss / dof) * cov[0][0])) : Number.NaN;

  const deltas = points.map((p) => {
    const f = baseFraction(p.pH, pKa);
    return deltaE00(p.lab, labOfAbsorbance([0, 1, 2].map((c) => (1 - f) * acid[c] + f * base[c]), blank));
  });
  const rmsDeltaE00 = Math.sqrt(deltas.reduce((s, d) => s + d * d, 0) / deltas.length);
  return { pKa, pKaStdErr, transition: [pKa - LOG10_9, pKa + LOG10_9], acidLab, baseLab, rmsDeltaE00 };
}


