/**
 * Benchmark: measure 8 vial regions and one white reference in a generated 12 MP JPEG, and compare
 * the median time with one plain full decode of the same file (sharp → raw) in the same run.
 * Usage: npm run bench:measure [-- --runs 15]. Goal: ratio ≤ 1.5 (decode once, never per region).
 */
import sharp from "sharp";
import { fitWhiteScaling } from "../lib/color/correction";
import { colourOfRegion } from "../lib/color/measure";
import { decodePhoto, measureRegion, measureRegions, type RegionSpec } from "../lib/color/regions";
import { mulberry32 } from "../lib/random";

const WIDTH = 4000;
const HEIGHT = 3000;
const runsArg = process.argv.indexOf("--runs");
const RUNS = runsArg > 0 ? Math.max(3, Number(process.argv[runsArg + 1]) || 15) : 15;

// Deterministic pseudo-random numbers, so every run measures the same picture.
const random = mulberry32;

const VIAL_COLOURS = [
  [210, 40, 60],
  [230, 150, 30],
  [240, 220, 60],
  [60, 160, 80],
  [40, 120, 200],
  [110, 60, 170],
  [200, 90, 160],
  [120, 80, 50],
];

/**
 * The picture: a lit background, 8 vials 300 × 1200 px with noise and a clipped specular stripe,
 * and a light grey reference card. Regions: the usual choice of the middle of each liquid column
 * (200 × 600 px) plus the card (400 × 250 px); a second, larger set (240 × 800 px) is timed too.
 */
async function makePhoto(): Promise<{ jpeg: Buffer; vials: RegionSpec[]; largeVials: RegionSpec[]; reference: RegionSpec }> {
  const rnd = random(20261202);
  const raw = Buffer.alloc(WIDTH * HEIGHT * 3);
  for (let j = 0; j < HEIGHT; j++) {
    for (let i = 0; i < WIDTH; i++) {
      const o = (j * WIDTH + i) * 3;
      const shade = 150 + Math.round((40 * i) / WIDTH) + Math.round((rnd() - 0.5) * 6);
      raw[o] = shade;
      raw[o + 1] = shade - 5;
      raw[o + 2] = shade - 15;
    }
  }
  const vials: RegionSpec[] = [];
  const largeVials: RegionSpec[] = [];
  const paint = (x: number, y: number, w: number, h: number, rgb: number[]) => {
    for (let j = y; j < y + h; j++) {
      for (let i = x; i < x + w; i++) {
        const o = (j * WIDTH + i) * 3;
        for (let c = 0; c < 3; c++) raw[o + c] = Math.max(1, Math.min(254, rgb[c] + Math.round((rnd() - 0.5) * 8)));
      }
    }
  };
  VIAL_COLOURS.forEach((rgb, k) => {
    const x = 250 + k * 450;
    const y = 900;
    paint(x, y, 300, 1200, rgb);
    // A specular stripe down each vial, as glass gives under a lamp.
    for (let j = y; j < y + 1200; j++) for (let i = x + 60; i < x + 75; i++) raw.fill(255, (j * WIDTH + i) * 3, (j * WIDTH + i) * 3 + 3);
    vials.push({ shape: "rect", x: x + 50, y: y + 300, w: 200, h: 600 });
    largeVials.push({ shape: "rect", x: x + 30, y: y + 200, w: 240, h: 800 });
  });
  paint(1700, 2300, 600, 400, [235, 235, 235]);
  const reference: RegionSpec = { shape: "rect", x: 1800, y: 2375, w: 400, h: 250 };
  const jpeg = await sharp(raw, { raw: { width: WIDTH, height: HEIGHT, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
  return { jpeg, vials, largeVials, reference };
}

async function plainDecode(jpeg: Buffer): Promise<number> {
  const t = performance.now();
  await sharp(jpeg).raw().toBuffer();
  return performance.now() - t;
}

async function measureAll(jpeg: Buffer, vials: RegionSpec[], reference: RegionSpec): Promise<number> {
  const t = performance.now();
  const photo = await decodePhoto(jpeg);
  const ref = measureRegion(photo, reference);
  const { correction } = fitWhiteScaling({ measured: ref.linearRgb, referenceLab: [93, 0, 0] }, "D65");
  const colours = measureRegions(photo, vials).map((s) => colourOfRegion(s, correction, "D65"));
  const elapsed = performance.now() - t;
  if (colours.length !== 8 || colours.some((c) => !c.lab.every(Number.isFinite))) throw new Error("measurement failed");
  return elapsed;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

const { jpeg, vials, largeVials, reference } = await makePhoto();
const pixelsIn = (set: RegionSpec[]) => set.reduce((s, v) => s + v.w * v.h, 0) + reference.w * reference.h;
// One warm-up of each so JIT compilation and libvips start-up are not timed.
await plainDecode(jpeg);
await measureAll(jpeg, vials, reference);
await measureAll(jpeg, largeVials, reference);
const decodeTimes: number[] = [];
const measureTimes: number[] = [];
const largeTimes: number[] = [];
for (let r = 0; r < RUNS; r++) {
  decodeTimes.push(await plainDecode(jpeg));
  measureTimes.push(await measureAll(jpeg, vials, reference));
  largeTimes.push(await measureAll(jpeg, largeVials, reference));
}
const decodeMs = median(decodeTimes);
const measureMs = median(measureTimes);
const largeMs = median(largeTimes);
const ratio = measureMs / decodeMs;
console.log(
  JSON.stringify(
    {
      image: `${WIDTH}×${HEIGHT} JPEG, ${(jpeg.length / 1e6).toFixed(1)} MB`,
      regions: `8 vials 200×600 + 1 reference 400×250, ${(pixelsIn(vials) / 1e6).toFixed(2)} M pixels`,
      runs: RUNS,
      plainDecodeMedianMs: Number(decodeMs.toFixed(1)),
      measureAllMedianMs: Number(measureMs.toFixed(1)),
      ratio: Number(ratio.toFixed(2)),
      goal: "ratio ≤ 1.5",
      met: ratio <= 1.5,
      largeRegions: {
        regions: `8 vials 240×800 + 1 reference 400×250, ${(pixelsIn(largeVials) / 1e6).toFixed(2)} M pixels`,
        measureAllMedianMs: Number(largeMs.toFixed(1)),
        ratio: Number((largeMs / decodeMs).toFixed(2)),
      },
    },
    null,
    2,
  ),
);
