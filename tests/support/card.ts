/**
 * A calibration card photographed in the test: 4 rows × 6 columns of patches on a dark backdrop,
 * each patch's linear RGB passed through a camera model, then sRGB-encoded (IEC 61966-2-1) to 8 bits.
 * The patches' known Lab are computed from their linear sRGB with the independent reference
 * formulas in srgb-reference.ts (IEC 61966-2-1 matrix, CIE 15:2004 Lab).
 */
import sharp from "sharp";
import { labOfLinear, srgbEncode } from "./srgb-reference";

export const CARD = { rows: 4, columns: 6, size: 60, gap: 10, margin: 30 };
const GREYS = [0.9, 0.59, 0.36, 0.19, 0.09, 0.03];
const CHROMATIC: [number, number, number][] = [
  [0.45, 0.05, 0.04], [0.07, 0.3, 0.06], [0.04, 0.06, 0.4], [0.62, 0.5, 0.04], [0.05, 0.3, 0.42], [0.5, 0.08, 0.35],
  [0.7, 0.3, 0.1], [0.2, 0.45, 0.6], [0.3, 0.12, 0.05], [0.12, 0.2, 0.05], [0.35, 0.2, 0.5], [0.6, 0.6, 0.2],
  [0.15, 0.05, 0.25], [0.4, 0.3, 0.25], [0.08, 0.15, 0.3], [0.55, 0.15, 0.2], [0.25, 0.5, 0.3], [0.1, 0.35, 0.2],
];
/** Linear sRGB of every patch, row by row from the top left: 6 greys, then 18 colours. */
export const CARD_LINEAR: [number, number, number][] = [...GREYS.map((g) => [g, g, g] as [number, number, number]), ...CHROMATIC];
export const CARD_PATCHES = CARD_LINEAR.map((rgb, i) => ({ name: i < 6 ? `grey ${i + 1}` : `colour ${i - 5}`, lab: labOfLinear(rgb) }));

export function cardCsv(patches = CARD_PATCHES): string {
  return ["name,L*,a*,b*,white point", ...patches.map((p) => `${p.name},${p.lab.map((v) => v.toFixed(4)).join(",")},D65`)].join("\n");
}

/** The outer corners of the corner patches: top left, top right, bottom right, bottom left. */
export function cardCorners(): [[number, number], [number, number], [number, number], [number, number]] {
  const { rows, columns, size, gap, margin } = CARD;
  const right = margin + columns * (size + gap) - gap;
  const bottom = margin + rows * (size + gap) - gap;
  return [[margin, margin], [right, margin], [right, bottom], [margin, bottom]];
}

export type Camera = (linear: [number, number, number]) => [number, number, number];
export const SRGB_CAMERA: Camera = (c) => c;

/** Paints the card as `camera` sees it; `override` replaces a patch's linear RGB (a wrongly printed patch). */
export async function cardPhoto(camera: Camera = SRGB_CAMERA, override: Record<number, [number, number, number]> = {}): Promise<Buffer> {
  const { rows, columns, size, gap, margin } = CARD;
  const w = margin * 2 + columns * (size + gap) - gap;
  const h = margin * 2 + rows * (size + gap) - gap;
  const px = Buffer.alloc(w * h * 3, 18);
  CARD_LINEAR.forEach((rgb, i) => {
    const seen = camera(override[i] ?? rgb).map((v) => Math.round(255 * srgbEncode(Math.min(1, Math.max(0, v)))));
    const x0 = margin + (i % columns) * (size + gap);
    const y0 = margin + Math.floor(i / columns) * (size + gap);
    for (let y = y0; y < y0 + size; y++) for (let x = x0; x < x0 + size; x++) px.set(seen, (y * w + x) * 3);
  });
  return sharp(px, { raw: { width: w, height: h, channels: 3 } }).png().toBuffer();
}
