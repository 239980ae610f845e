/**
 * A calibration-card photo (and dye vials) taken by a synthetic camera that is not sRGB, as a PNG or
 * JPEG file, with every swatch's box and its true CIELAB from the CIE tables in tests/fixtures
 * (tests/support/spectral-card.ts). For unit, integration and end-to-end tests of calibration.
 */
import sharp from "sharp";
import { renderSwatches, SYNTHETIC_CAMERAS, type SyntheticCamera } from "@/lib/color/synthetic-camera";
import { CARD, sceneXyzD65, spectrumLab, VIALS, type Illuminant } from "./spectral-card";

export type Box = [number, number, number, number];
export type CardPhoto = {
  file: Buffer;
  width: number;
  height: number;
  /** Card patches in card order (CARD: 18 colours, then 6 greys from white to black), grid 6 columns × 4 rows. */
  patches: { name: string; box: Box; lab: [number, number, number] }[];
  /** Vials after the card, same grid (two more rows), with their true CIELAB. */
  vials: { name: string; box: Box; lab: [number, number, number] }[];
  /** Pixel size of one grid cell and the gap, for placing a grid over the card. */
  grid: { columns: number; rows: number; size: number; gap: number };
};

/**
 * Renders the card (and optionally the vials) under `light`; `white` is the white point of the
 * returned CIELAB values. Boxes are inset by `inset` px from each swatch's edge.
 */
export async function cardPhoto(
  opts: { camera?: SyntheticCamera; light?: Illuminant; white?: "D65" | "D50"; withVials?: boolean; format?: "png" | "jpeg"; size?: number; gap?: number; inset?: number; seed?: number } = {},
): Promise<CardPhoto> {
  const camera = opts.camera ?? SYNTHETIC_CAMERAS.warmPhone;
  const light = opts.light ?? "D65";
  const white = opts.white ?? "D65";
  const size = opts.size ?? 60;
  const gap = opts.gap ?? 12;
  const inset = opts.inset ?? 8;
  const vials = opts.withVials === false ? [] : VIALS;
  const swatches = [...CARD.map((p) => sceneXyzD65(p.reflectance, light)), ...vials.map((v) => sceneXyzD65(v.transmittance, light))];
  const r = renderSwatches(camera, { swatches, columns: 6, size, gap }, opts.seed ?? 1);
  const img = sharp(Buffer.from(r.data), { raw: { width: r.width, height: r.height, channels: 3 } });
  const file = opts.format === "jpeg" ? await img.jpeg({ quality: 92 }).toBuffer() : await img.png().toBuffer();
  const box = (i: number): Box => [r.boxes[i][0] + inset, r.boxes[i][1] + inset, r.boxes[i][2] - 2 * inset, r.boxes[i][3] - 2 * inset];
  return {
    file,
    width: r.width,
    height: r.height,
    patches: CARD.map((p, i) => ({ name: p.name, box: box(i), lab: spectrumLab(p.reflectance, white) })),
    vials: vials.map((v, i) => ({ name: v.name, box: box(CARD.length + i), lab: spectrumLab(v.transmittance, white) })),
    grid: { columns: 6, rows: 4, size, gap },
  };
}
