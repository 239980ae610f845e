import type { Lab } from "@/lib/color/types";

/** An axis-aligned box in CIELAB; infinite sides mean "unbounded on that side". */
export type LabBox = { lMin: number; lMax: number; aMin: number; aMax: number; bMin: number; bMax: number };

/** 1 − sin 60°: the smallest the CIEDE2000 chroma–hue quadratic form can shrink (see below). */
export const RT_FLOOR = 1 - Math.sqrt(3) / 2;
const SQRT_RT_FLOOR = Math.sqrt(RT_FLOOR);
/** Inflation for floating-point rounding in the ΔE00 evaluation (relative and absolute). */
const SLACK_REL = 1e-9;
const SLACK_ABS = 1e-9;

const POW25_7 = 6103515625; // 25^7
/** G of CIEDE2000 as a function of the mean C*ab; decreasing, 0.5 at 0. */
const gOf = (cab: number) => {
  const c7 = cab ** 7;
  return 0.5 * (1 - Math.sqrt(c7 / (c7 + POW25_7)));
};
/** RC of CIEDE2000 as a function of the mean C′; increasing, below 2. */
const rcOf = (cp: number) => {
  const c7 = cp ** 7;
  return 2 * Math.sqrt(c7 / (c7 + POW25_7));
};
const DEG = 180 / Math.PI;
/** Circular distance in degrees from the hue interval [lo, lo + width] to 275°. */
function hueDistanceTo275(lo: number, width: number): number {
  if (width >= 360) return 0;
  const start = ((lo % 360) + 360) % 360;
  const offset = (((275 - start) % 360) + 360) % 360; // 275° measured forward from the start
  if (offset <= width) return 0;
  return Math.min(offset - width, 360 - offset);
}
/** SL of CIEDE2000 at |L̄′ − 50| = u; increasing in u. */
const slOf = (u: number) => 1 + (0.015 * u * u) / Math.sqrt(20 + u * u);

/**
 * A CIELAB box that provably contains every colour within CIEDE2000 distance `r` of `target`:
 * `ΔE00(target, x) ≤ r ⇒ x ∈ box`. No sampling or fitted constant is involved; the argument uses only
 * bounds on the weighting functions of CIEDE2000 (Sharma, Wu & Dalal 2005, eqs. 1–22; kL = kC = kH = 1).
 * Subscript 1 is the target, 2 any colour within r of it.
 *
 * Write ΔE00² = X² + Y² + Z² + RT·Y·Z with X = ΔL′/SL, Y = ΔC′/SC, Z = ΔH′/SH.
 *
 * 1. Rotation term. RT = −sin(2Δθ)·RC with Δθ = 30°·exp(−((h̄′ − 275°)/25°)²) ∈ [0°, 30°] and
 *    RC = 2·√(C̄′⁷/(C̄′⁷ + 25⁷)) < 2, so |RT| ≤ ρ := RCmax·sin(2Δθmax) < √3. Since |Y·Z| ≤ (Y² + Z²)/2,
 *    ΔE00² ≥ X² + κ·(Y² + Z²) with κ = 1 − ρ/2 ≥ 1 − √3/2 ≈ 0.134 ({@link RT_FLOOR}).
 * 2. Hue weight. T = 1 − 0.17cos(h̄′−30°) + 0.24cos(2h̄′) + 0.32cos(3h̄′+6°) − 0.20cos(4h̄′−63°) lies in
 *    [0.07, 1.93] (triangle inequality), so SH = 1 + 0.015·C̄′·T ≤ 1 + 0.029·C̄′ ≤ SC = 1 + 0.045·C̄′.
 *    Hence Y² + Z² ≥ (ΔC′² + ΔH′²)/SC². With ΔH′ = 2√(C′₁C′₂)·sin(Δh′/2), ΔC′² + ΔH′² = C′₁² + C′₂² −
 *    2C′₁C′₂cos Δh′ = d′², the Euclidean distance of the two colours in the (a′, b) plane. So
 *    ΔE00 ≤ r ⇒ d′ ≤ r·SC/√κ.
 * 3. a′ rescaling. a′ = a·(1 + G) with one G ∈ [0, 0.5] for both colours, so d′² = (1+G)²Δa² + Δb²:
 *    |Δb| ≤ d′ and |Δa| ≤ d′/(1 + G).
 * 4. First bound D₀ on d′, valid for every colour: C′₁ ≤ Ĉ₁ := √(2.25·a₁² + b₁²), C̄′ ≤ C′₁ + d′/2
 *    (C′₂ ≤ C′₁ + d′) and κ ≥ 1 − √3/2 give √κ·d′ ≤ r·(1 + 0.045·Ĉ₁ + 0.0225·d′), i.e.
 *    d′ ≤ D₀ = r(1 + 0.045·Ĉ₁)/(√κ − 0.0225·r) when r < √κ/0.0225 ≈ 16.3; beyond that, a and b are
 *    left unbounded.
 * 5. Refinement (repeated; each step uses only that d′ ≤ D, already proven): |C*ab,₂ − C*ab,₁| ≤
 *    |Δa, Δb| ≤ d′ ≤ D, so the mean C*ab is within D/2 of C*ab,₁ and G lies between G(C*ab,₁ + D/2)
 *    and G(max(0, C*ab,₁ − D/2)); that brackets C′₁ and the target's hue h′₁. C̄′ ≤ C′₁,max + D/2 bounds
 *    SC and RC from above. If D < C′₁,min, the second colour's hue is within asin(D/C′₁,min) of h′₁
 *    and the mean hue h̄′ (the midpoint of the short arc, or h′₁ itself when C′₂ = 0) within half of
 *    that, which bounds Δθ by its value at the nearest hue to 275° (circular distance, ≥ Sharma's
 *    unwrapped |h̄′ − 275°|). Then D ← min(D, r·SCmax/√κ) with κ = 1 − RCmax·sin(2Δθmax)/2, and
 *    |Δa| ≤ D/(1 + Gmin).
 * 6. Lightness. |X| ≤ ΔE00 and SL(u) = 1 + 0.015u²/√(20 + u²) ≤ 1 + 0.015u, increasing in
 *    u = |L̄′ − 50| ≤ |L₁ − 50| + |ΔL|/2: |ΔL| ≤ W₀ = r(1 + 0.015|L₁ − 50|)/(1 − 0.0075·r) for r < 133
 *    (else unbounded), refined by W ← r·SL(|L₁ − 50| + W/2).
 *
 * 7. Ellipsoid. Each refinement step's D satisfies D ≥ r·SC/√κ with the κ of that step, and W ≥ r·SL,
 *    so ΔE00 ≤ r gives r² ≥ ΔE00² ≥ (ΔL/SL)² + κ·d′²/SC² ≥ r²·((ΔL/W)² + (d′/D)²); with
 *    d′² ≥ (1 + Gmin)²Δa² + Δb², every colour within r also lies in the ellipsoid inscribed in the box:
 *    (ΔL/W)² + (Δa/(D/(1 + Gmin)))² + (Δb/D)² ≤ 1, about half the box's volume.
 *
 * The box is then widened by a relative and an absolute 1e-9 so floating-point rounding in the ΔE00
 * evaluation cannot push a colour at exactly distance r outside it. Away from blue hues the box is
 * about r·SC wide in a and b, close to the true extent; near h̄′ = 275° it is up to 1/√κ ≈ 2.7 times
 * wider. The exact re-rank removes the extra candidates, so looseness costs time, never correctness.
 */
export function labBoxForDeltaE00(target: Lab, r: number): LabBox {
  if (!(r >= 0)) throw new RangeError(`radius must be a non-negative number, got ${r}`);
  const [L1, a1, b1] = target;
  const cab1 = Math.sqrt(a1 * a1 + b1 * b1);

  // a–b plane: closed-form bound (step 4), then refinements (step 5).
  const abDenominator = SQRT_RT_FLOOR - 0.0225 * r;
  let D = abDenominator > 0 ? (r * (1 + 0.045 * Math.sqrt(2.25 * a1 * a1 + b1 * b1))) / abDenominator : Infinity;
  for (let step = 0; step < 4 && Number.isFinite(D); step++) {
    const gMin = gOf(cab1 + D / 2);
    const gMax = gOf(Math.max(0, cab1 - D / 2));
    const cp1Min = Math.sqrt(a1 * a1 * (1 + gMin) ** 2 + b1 * b1);
    const cp1Max = Math.sqrt(a1 * a1 * (1 + gMax) ** 2 + b1 * b1);
    const scMax = 1 + 0.045 * (cp1Max + D / 2);
    const rcMax = rcOf(cp1Max + D / 2);
    let dThetaMax = 30;
    if (D < cp1Min) {
      // Target hue over G ∈ [gMin, gMax]: atan2 is monotone in the a′ scale, so the two ends bracket it.
      const hA = Math.atan2(b1, a1 * (1 + gMin)) * DEG;
      const hB = Math.atan2(b1, a1 * (1 + gMax)) * DEG;
      let spread = Math.abs(hA - hB);
      if (spread > 180) spread = 360 - spread;
      const lo = spread === Math.abs(hA - hB) ? Math.min(hA, hB) : Math.max(hA, hB);
      const half = (Math.asin(D / cp1Min) * DEG) / 2;
      const dist = hueDistanceTo275(lo - half, spread + 2 * half);
      dThetaMax = 30 * Math.exp(-((dist / 25) ** 2));
    }
    const kappa = 1 - (rcMax * Math.sin((2 * dThetaMax) / DEG)) / 2;
    D = Math.min(D, (r * scMax) / Math.sqrt(kappa));
  }
  const halfA = D / (1 + (Number.isFinite(D) ? gOf(cab1 + D / 2) : 0));
  const halfB = D;

  // Lightness (step 6).
  const u1 = Math.abs(L1 - 50);
  const lDenominator = 1 - 0.0075 * r;
  let W = lDenominator > 0 ? (r * (1 + 0.015 * u1)) / lDenominator : Infinity;
  for (let step = 0; step < 3 && Number.isFinite(W); step++) W = Math.min(W, r * slOf(u1 + W / 2));

  const wA = halfA * (1 + SLACK_REL) + SLACK_ABS;
  const wB = halfB * (1 + SLACK_REL) + SLACK_ABS;
  const wL = W * (1 + SLACK_REL) + SLACK_ABS;
  return { lMin: L1 - wL, lMax: L1 + wL, aMin: a1 - wA, aMax: a1 + wA, bMin: b1 - wB, bMax: b1 + wB };
}

export function boxContains(box: LabBox, l: number, a: number, b: number): boolean {
  return l >= box.lMin && l <= box.lMax && a >= box.aMin && a <= box.aMax && b >= box.bMin && b <= box.bMax;
}

/** True when the box has no finite side: a fetch with it sees every colour. */
export function boxIsUnbounded(box: LabBox): boolean {
  return [box.lMin, box.aMin, box.bMin].every((v) => v === -Infinity) && [box.lMax, box.aMax, box.bMax].every((v) => v === Infinity);
}

/**
 * (ΔL/wL)² + (Δa/wA)² + (Δb/wB)² for the half-widths of a box centred on the target: ≤ 1 inside
 * the box's inscribed ellipsoid, which also holds every colour within the box's ΔE00 radius
 * (step 7 of {@link labBoxForDeltaE00}). Infinite half-widths contribute 0.
 */
export function ellipsoidMetric(dl: number, da: number, db: number, wl: number, wa: number, wb: number): number {
  const x = dl / wl;
  const y = da / wa;
  const z = db / wb;
  return x * x + y * y + z * z;
}
