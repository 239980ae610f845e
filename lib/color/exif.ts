import exifReader from "exif-reader";

/** The few EXIF fields Solvatlas records with a photo. */
export type PhotoExif = {
  make?: string;
  model?: string;
  /**
   * DateTimeOriginal (else DateTime) as ISO 8601. EXIF carries no time zone, so the camera's clock
   * time is written as if it were UTC.
   */
  takenAt?: string;
  /** EXIF orientation 1–8 of the file as stored (the decoded pixels already have it applied). */
  orientation?: number;
  /** Seconds. */
  exposureTime?: number;
  fNumber?: number;
  iso?: number;
};

const text = (v: unknown) => (typeof v === "string" && v.trim() ? v.trim().slice(0, 100) : undefined);
const num = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : Array.isArray(v) && typeof v[0] === "number" ? v[0] : undefined);

/**
 * Reads Make, Model, DateTime(Original), Orientation, ExposureTime, FNumber and ISO from an EXIF
 * block (CIPA DC-008 / JEITA CP-3451) with exif-reader. Accepts the block with or without the
 * "Exif\0\0" prefix. A malformed block gives whatever could be read; never throws, since damaged
 * EXIF is no reason to refuse the pixels.
 */
export function parseExif(block: Uint8Array | undefined): PhotoExif {
  if (!block || block.length < 8) return {};
  let e: ReturnType<typeof exifReader>;
  try {
    e = exifReader(Buffer.from(block.buffer, block.byteOffset, block.byteLength));
  } catch {
    return {};
  }
  const taken = e.Photo?.DateTimeOriginal ?? e.Image?.DateTime;
  const out: PhotoExif = {
    make: text(e.Image?.Make),
    model: text(e.Image?.Model),
    takenAt: taken instanceof Date && !Number.isNaN(taken.getTime()) ? taken.toISOString() : undefined,
    orientation: num(e.Image?.Orientation),
    exposureTime: num(e.Photo?.ExposureTime),
    fNumber: num(e.Photo?.FNumber),
    iso: num(e.Photo?.ISOSpeedRatings ?? e.Photo?.PhotographicSensitivity),
  };
  for (const k of Object.keys(out) as (keyof PhotoExif)[]) if (out[k] === undefined) delete out[k];
  return out;
}
