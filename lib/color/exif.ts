/** The few EXIF fields Solvatlas records with a photo. */
export type PhotoExif = {
  make?: string;
  model?: string;
  /** DateTimeOriginal (else DateTime) as written by the camera, "YYYY:MM:DD HH:MM:SS", no time zone. */
  takenAt?: string;
  /** EXIF orientation 1–8 of the file as stored (the decoded pixels already have it applied). */
  orientation?: number;
  /** Seconds. */
  exposureTime?: number;
  fNumber?: number;
  iso?: number;
};

const TYPE_SIZE: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 7: 1, 9: 4, 10: 8 };

/**
 * Reads Make, Model, DateTime(Original), Orientation, ExposureTime, FNumber and ISO from an EXIF
 * block (TIFF structure, CIPA DC-008 / JEITA CP-3451). Accepts the block with or without the
 * "Exif\0\0" prefix. Malformed or truncated blocks give whatever could be read; never throws.
 */
export function parseExif(block: Uint8Array | undefined): PhotoExif {
  const out: PhotoExif = {};
  if (!block || block.length < 8) return out;
  let base = 0;
  if (block[0] === 0x45 && block[1] === 0x78 && block[2] === 0x69 && block[3] === 0x66) base = 6;
  const view = new DataView(block.buffer, block.byteOffset, block.byteLength);
  if (base + 8 > block.length) return out;
  const order = view.getUint16(base);
  const little = order === 0x4949;
  if (!little && order !== 0x4d4d) return out;
  const u16 = (o: number) => view.getUint16(base + o, little);
  const u32 = (o: number) => view.getUint32(base + o, little);
  const inRange = (o: number, n: number) => o >= 0 && base + o + n <= block.length;

  type Entry = { type: number; count: number; valueOffset: number };
  const readIfd = (offset: number): Map<number, Entry> => {
    const entries = new Map<number, Entry>();
    if (!inRange(offset, 2)) return entries;
    const n = u16(offset);
    for (let i = 0; i < n; i++) {
      const e = offset + 2 + i * 12;
      if (!inRange(e, 12)) break;
      const type = u16(e + 2);
      const count = u32(e + 4);
      const size = (TYPE_SIZE[type] ?? 0) * count;
      entries.set(u16(e), { type, count, valueOffset: size <= 4 ? e + 8 : u32(e + 8) });
    }
    return entries;
  };
  const ascii = (e: Entry | undefined): string | undefined => {
    if (!e || e.type !== 2 || !inRange(e.valueOffset, e.count)) return undefined;
    let s = "";
    for (let i = 0; i < e.count; i++) {
      const c = block[base + e.valueOffset + i];
      if (c === 0) break;
      s += String.fromCharCode(c);
    }
    s = s.trim();
    return s || undefined;
  };
  const num = (e: Entry | undefined): number | undefined => {
    if (!e) return undefined;
    const o = e.valueOffset;
    if (e.type === 3 && inRange(o, 2)) return u16(o);
    if (e.type === 4 && inRange(o, 4)) return u32(o);
    if ((e.type === 5 || e.type === 10) && inRange(o, 8)) {
      const n = e.type === 5 ? u32(o) : view.getInt32(base + o, little);
      const d = e.type === 5 ? u32(o + 4) : view.getInt32(base + o + 4, little);
      return d === 0 ? undefined : n / d;
    }
    return undefined;
  };

  if (!inRange(4, 4)) return out;
  const ifd0 = readIfd(u32(4));
  out.make = ascii(ifd0.get(0x010f));
  out.model = ascii(ifd0.get(0x0110));
  out.orientation = num(ifd0.get(0x0112));
  let takenAt = ascii(ifd0.get(0x0132));
  const exifPointer = num(ifd0.get(0x8769));
  if (exifPointer !== undefined) {
    const sub = readIfd(exifPointer);
    out.exposureTime = num(sub.get(0x829a));
    out.fNumber = num(sub.get(0x829d));
    out.iso = num(sub.get(0x8827));
    takenAt = ascii(sub.get(0x9003)) ?? takenAt;
  }
  out.takenAt = takenAt;
  for (const key of Object.keys(out) as (keyof PhotoExif)[]) if (out[key] === undefined) delete out[key];
  return out;
}
