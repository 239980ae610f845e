/**
 * Where the patches of a rows × columns card lie in a photo, from the four corners of the grid the
 * admin dragged into place (the outer corners of the corner patches). Pure.
 */
import type { RegionSpec } from "../color/regions";

export type Point = [number, number];
/** Top left, top right, bottom right, bottom left, in photo pixels. */
export type Corners = [Point, Point, Point, Point];

/** Share of a cell's width and height sampled: the middle half, clear of the gaps and edges between patches. */
export const SAMPLE_FRACTION = 0.5;

/** Bilinear point inside the quadrilateral at (u, v) ∈ [0, 1]² (u across, v down). */
function bilinear(c: Corners, u: number, v: number): Point {
  const [tl, tr, br, bl] = c;
  const top: Point = [tl[0] + (tr[0] - tl[0]) * u, tl[1] + (tr[1] - tl[1]) * u];
  const bottom: Point = [bl[0] + (br[0] - bl[0]) * u, bl[1] + (br[1] - bl[1]) * u];
  return [top[0] + (bottom[0] - top[0]) * v, top[1] + (bottom[1] - top[1]) * v];
}

/**
 * One rectangular sampling region per patch, row by row from the top left. Each is centred on its
 * cell and spans `SAMPLE_FRACTION` of the cell's local size (the quadrilateral may be slightly skewed).
 */
export function patchRegions(corners: Corners, rows: number, columns: number): RegionSpec[] {
  const regions: RegionSpec[] = [];
  for (let r = 0; r < rows; r++) {
    for (let k = 0; k < columns; k++) {
      const centre = bilinear(corners, (k + 0.5) / columns, (r + 0.5) / rows);
      const left = bilinear(corners, k / columns, (r + 0.5) / rows);
      const right = bilinear(corners, (k + 1) / columns, (r + 0.5) / rows);
      const top = bilinear(corners, (k + 0.5) / columns, r / rows);
      const bottom = bilinear(corners, (k + 0.5) / columns, (r + 1) / rows);
      const w = Math.max(2, Math.hypot(right[0] - left[0], right[1] - left[1]) * SAMPLE_FRACTION);
      const h = Math.max(2, Math.hypot(bottom[0] - top[0], bottom[1] - top[1]) * SAMPLE_FRACTION);
      regions.push({ shape: "rect", x: Math.round(centre[0] - w / 2), y: Math.round(centre[1] - h / 2), w: Math.round(w), h: Math.round(h) });
    }
  }
  return regions;
}
