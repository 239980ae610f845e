import { CARD, VIALS, sceneXyzD65, spectrumLab } from "./tests/support/spectral-card";
import { SYNTHETIC_CAMERAS, renderSwatches } from "./lib/color/synthetic-camera";
import { measureRegion, type DecodedPhoto } from "./lib/color/regions";
import { fitCalibration, applyCalibration, type CalibrationMethodChoice } from "./lib/color/calibration";
import { deltaE00 } from "./lib/color/difference";

const light = (process.argv[2] ?? "D65") as "D65" | "A";
const wp = (process.argv[3] ?? "D65") as "D65" | "D50";
for (const [key, cam] of Object.entries(SYNTHETIC_CAMERAS)) {
  const card = CARD.map((p) => sceneXyzD65(p.reflectance, light));
  const vials = VIALS.map((v) => sceneXyzD65(v.transmittance, light));
  const r = renderSwatches(cam, { swatches: [...card, ...vials], columns: 6, size: 40, gap: 8 }, 7);
  const photo: DecodedPhoto = { width: r.width, height: r.height, channels: 3, bitDepth: 8, data: r.data, format: "png", exif: {} };
  const stats = r.boxes.map(([x, y, w, h]) => measureRegion(photo, { shape: "rect", x: x + 4, y: y + 4, w: w - 8, h: h - 8 }));
  const patches = CARD.map((p, i) => ({ name: p.name, camera: stats[i].linearRgb, referenceLab: spectrumLab(p.reflectance, wp) as any, flags: stats[i].flags, clippedFraction: stats[i].clippedFraction }));
  for (const method of ["white", "matrix-3x3", "root-polynomial-2", "auto"] as CalibrationMethodChoice[]) {
    for (const linearise of [true, false]) {
      try {
        const cal = fitCalibration(patches, { method, whitePoint: wp, linearise });
        const errs = VIALS.map((v, i) => deltaE00(applyCalibration(cal, stats[CARD.length + i].linearRgb).labD65, spectrumLab(v.transmittance, "D65") as any));
        console.log(key, method, cal.method, linearise, "train", cal.meanDeltaE00.toFixed(2), "loo", cal.meanLooDeltaE00?.toFixed(2), cal.maxLooDeltaE00?.toFixed(2), "vials mean", (errs.reduce((a, b) => a + b) / errs.length).toFixed(2), "max", Math.max(...errs).toFixed(2), stats.some(s=>s.flags.length)?JSON.stringify(stats.map(s=>s.flags.join())):"");
      } catch (e) { console.log(key, method, linearise, "ERR", (e as Error).message); }
    }
  }
}
