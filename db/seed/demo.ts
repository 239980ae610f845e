/**
 * Seeds the solvent table (reference data) and the invented demo scenario. Both only ever run on an
 * empty database, inside one transaction each, so a failure leaves nothing half-written.
 */
import path from "node:path";
import sharp from "sharp";
import { sql } from "drizzle-orm";
import { WHITE_POINTS_2DEG } from "../../lib/color/illuminants";
import { xyzToLab } from "../../lib/color/lab";
import { applyCorrection, correctionToArray, fitMatrix3x3 } from "../../lib/color/correction";
import type { Mat3 } from "../../lib/color/matrix";
import { linearSrgbToLab } from "../../lib/color/convert";
import { deltaE00 } from "../../lib/color/difference";
import { linearSrgbToXyzD65, mat3MulVec, srgbEncode, xyzD65ToLinearSrgb } from "../../lib/color/srgb";
import { lambdaMax } from "../../lib/color/spectrum";
import type { Lab, LinearRgb, Vec3 } from "../../lib/color/types";
import { hashPassword } from "../../lib/auth/password";
import { LocalStorage } from "../../lib/storage/local";
import type { Db } from "../connection";
import {
  calibrationTargets,
  conditions,
  dyes,
  checkStandards,
  lightingProfiles,
  measurements,
  photos,
  shortlistItems,
  shortlists,
  solventPanels,
  solvents,
  spectra,
  users,
  type AcidBase,
  type NewMeasurement,
  type Solvent,
} from "../schema";
import { recordAudit } from "../queries/audit";
import { ensureAllDyeModels } from "../queries/models";
import { groupImplicitSeries } from "../queries/ph-series";
import { demoColour, demoDyes, demoSpectrum, gaussian, rng, type DemoDye } from "./demo-model";
import { buildSolventTable } from "./solvent-table";

export const DEMO_PASSWORD = "solvatlas-demo";
export const DEMO_USERS = [
  { id: "usr_demo_admin", email: "admin@demo.test", name: "Ada Okonkwo", role: "admin" as const },
  { id: "usr_demo_chemist", email: "chemist@demo.test", name: "Chidi Brennan", role: "chemist" as const },
  { id: "usr_demo_formulator", email: "formulator@demo.test", name: "Fenna Lindqvist", role: "formulator" as const },
  // A second chemist, so the first has someone else's racks to review.
  { id: "usr_demo_chemist2", email: "chemist2@demo.test", name: "Ines Marlowe", role: "chemist" as const },
];

function count(db: Db, table: typeof users | typeof solvents): number {
  return db.select({ n: sql<number>`count(*)` }).from(table).get()?.n ?? 0;
}

/** Loads the published solvent table if the solvents table is empty. Returns the number added. */
export function seedSolvents(db: Db): number {
  if (count(db, solvents) > 0) return 0;
  const rows = buildSolventTable();
  db.transaction((tx) => {
    for (const row of rows) tx.insert(solvents).values(row).run();
    recordAudit(tx, { actorId: null, action: "solvents.seed", entity: "solvent", after: { count: rows.length } });
  });
  return rows.length;
}

type Camera = { name: string; matrix: Mat3 };

/** Two invented bench cameras; the raw response is a cross-talk matrix times a light-cast gain. */
const CAMERAS: Camera[] = [
  {
    name: "Bench camera 1 (fixed mount, 24 MP)",
    matrix: [
      [0.92, 0.06, 0.02],
      [0.04, 0.9, 0.06],
      [0.01, 0.07, 0.88],
    ].map((row, i) => row.map((v) => v * [1.0, 0.97, 0.9][i])) as Mat3,
  },
  {
    name: "Bench camera 2 (copy stand, 20 MP)",
    matrix: [
      [0.85, 0.12, 0.03],
      [0.06, 0.86, 0.08],
      [0.02, 0.1, 0.8],
    ].map((row, i) => row.map((v) => v * [1.08, 1.0, 0.82][i])) as Mat3,
  },
];

/** Demo calibration card: patch colours defined in linear sRGB (invented, demo only). */
const CARD_PATCHES: { name: string; rgb: Vec3 }[] = [
  { name: "white", rgb: [0.88, 0.88, 0.88] },
  { name: "grey 50", rgb: [0.19, 0.19, 0.19] },
  { name: "black", rgb: [0.02, 0.02, 0.02] },
  { name: "red", rgb: [0.45, 0.05, 0.04] },
  { name: "green", rgb: [0.07, 0.3, 0.06] },
  { name: "blue", rgb: [0.04, 0.06, 0.4] },
  { name: "yellow", rgb: [0.62, 0.5, 0.04] },
  { name: "cyan", rgb: [0.05, 0.3, 0.42] },
];

function labOfLinear(rgb: LinearRgb): Lab {
  return xyzToLab(linearSrgbToXyzD65(rgb), WHITE_POINTS_2DEG.D65);
}

const VIAL = { w: 100, h: 220, y: 140, x0: 60, step: 135 };
const WHITE_PATCH = { x: 1140, y: 180, w: 100, h: 120 };
const IMAGE = { w: 1280, h: 480 };

/** A rack photo: dark backdrop, one vial region per sample (raw camera colour + noise), a white tile. */
async function renderRack(vials: LinearRgb[], white: LinearRgb, random: () => number): Promise<Buffer> {
  const pixels = Buffer.alloc(IMAGE.w * IMAGE.h * 3);
  const backdrop: LinearRgb = [0.025, 0.027, 0.03];
  // Each region gets one long strip of noisy pixels; rows are cut from it at varying offsets, which
  // keeps rendering of a hundred photos to well under a second.
  const paint = (x0: number, y0: number, w: number, h: number, rgb: LinearRgb, noise: number) => {
    const encoded = rgb.map((c) => srgbEncode(Math.min(1, Math.max(0, c))) * 255);
    const strip = new Uint8Array(w * 3 * 4);
    for (let i = 0; i < strip.length; i++) strip[i] = Math.max(0, Math.min(255, Math.round(encoded[i % 3] + noise * gaussian(random))));
    for (let y = y0; y < y0 + h; y++) {
      const offset = 3 * Math.floor(random() * w * 3);
      pixels.set(strip.subarray(offset, offset + w * 3), (y * IMAGE.w + x0) * 3);
    }
  };
  paint(0, 0, IMAGE.w, IMAGE.h, backdrop, 1.5);
  vials.forEach((rgb, i) => paint(VIAL.x0 + i * VIAL.step, VIAL.y, VIAL.w, VIAL.h, rgb, 1.2));
  paint(WHITE_PATCH.x, WHITE_PATCH.y, WHITE_PATCH.w, WHITE_PATCH.h, white, 1.0);
  return sharp(pixels, { raw: { width: IMAGE.w, height: IMAGE.h, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
}

const PANEL = [
  "Water", "Methanol", "Ethanol", "2-Propanol", "tert-Butanol", "Ethylene glycol", "Benzyl alcohol", "2,2,2-Trifluoroethanol",
  "Acetone", "2-Butanone", "Acetonitrile", "N,N-Dimethylformamide", "Dimethyl sulfoxide", "N-Methyl-2-pyrrolidone",
  "Pyridine", "Dichloromethane", "Tetrahydrofuran", "Ethyl acetate", "Chloroform", "1,4-Dioxane", "Toluene", "Cyclohexane", "n-Hexane",
];

type Planned = { dye: DemoDye; solvent: Solvent; acidBase: AcidBase; pH: number | null; additive: string };

function plan(dyeList: DemoDye[], solventByName: Map<string, Solvent>, random: () => number): Planned[] {
  const out: Planned[] = [];
  dyeList.forEach((dye, index) => {
    const panel = PANEL.filter(() => random() < 0.8).filter((name) => !dye.panel || dye.panel.includes(name));
    for (const name of panel) out.push({ dye, solvent: solventByName.get(name)!, acidBase: "neutral", pH: name === "Water" ? 7 : null, additive: "" });
    if (dye.pKa !== undefined) {
      for (const name of ["Water", "Ethanol"]) {
        const solvent = solventByName.get(name)!;
        out.push({ dye, solvent, acidBase: "acid", pH: 1.5, additive: name === "Water" ? "0.03 M HCl" : "0.03 M HCl (aq), 1 % v/v" });
        out.push({ dye, solvent, acidBase: "base", pH: 12.5, additive: name === "Water" ? "0.03 M NaOH" : "0.03 M NaOH (aq), 1 % v/v" });
      }
      if (index % 2 === 0) {
        for (let pH = 1; pH <= 13; pH++) {
          out.push({ dye, solvent: solventByName.get("Water")!, acidBase: pH < 6 ? "acid" : pH > 8 ? "base" : "neutral", pH, additive: "universal buffer" });
        }
      }
    }
  });
  return out;
}

/** Seeds the invented demo scenario if there are no users yet. Returns what it added. */
export async function seedDemo(db: Db, dataDirectory: string, options: { models?: boolean } = {}): Promise<{ users: number; dyes: number; measurements: number; photos: number } | null> {
  seedSolvents(db);
  if (count(db, users) > 0) return null;

  const random = rng(7);
  const storage = new LocalStorage(path.join(dataDirectory, "objects"));
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const solventRows = db.select().from(solvents).all();
  const solventByName = new Map(solventRows.map((s) => [s.name, s]));
  const dyeList = demoDyes();
  const planned = plan(dyeList, solventByName, random);
  const [admin, chemist, formulator, chemist2] = DEMO_USERS;

  // Profiles: the first light box until June 2026, the copy stand after. Each is fitted the way an
  // admin would: a photo of the calibration card under that light (the camera's response with a
  // slight non-linearity and noise), then the colour engine's 3×3 least-squares fit.
  const profileDefs = CAMERAS.map((camera, i) => {
    const patches = CARD_PATCHES.map((p) => ({
      measured: mat3MulVec(camera.matrix, p.rgb).map((v) => Math.pow(Math.max(v, 1e-6), 1.03) * (1 + 0.004 * gaussian(random))) as LinearRgb,
      referenceLab: labOfLinear(p.rgb),
    }));
    const fit = fitMatrix3x3(patches, "D65");
    const stored = correctionToArray(fit.correction);
    // Leave-one-out: each patch predicted by the fit to the others (what approval is judged by).
    const loo = patches.map((p, k) => deltaE00(linearSrgbToLab(applyCorrection(fitMatrix3x3(patches.filter((_, j) => j !== k), "D65").correction, p.measured), "D65"), p.referenceLab));
    return {
      fit,
      row: {
        id: `lp_demo_${i + 1}`,
        name: i === 0 ? "Light box North — D65 LED panel" : "Copy stand South — daylight LED strip",
        illuminant: "D65" as const,
        lightSource: i === 0 ? "Daylight LED panel, 6500 K, diffuser box" : "Daylight LED strips, 6500 K, two sides at 45°",
        camera: camera.name,
        targetId: "ct_demo_card",
        correctionKind: stored.kind,
        correction: stored.values,
        residuals: CARD_PATCHES.map((p, k) => ({ patch: p.name, deltaE00: Math.round(fit.residuals[k].deltaE00 * 1e4) / 1e4, looDeltaE00: Math.round(loo[k] * 1e4) / 1e4 })),
        validFrom: new Date(i === 0 ? "2026-03-01T08:00:00Z" : "2026-06-01T08:00:00Z"),
        validUntil: i === 0 ? new Date("2026-05-31T18:00:00Z") : null,
        approvedBy: admin.id,
        approvedAt: new Date(i === 0 ? "2026-03-01T09:00:00Z" : "2026-06-01T09:00:00Z"),
        createdBy: admin.id,
        state: "approved" as const,
        colourTemperatureK: 6500,
        cameraSettings: i === 0 ? "Manual: 1/60 s, f/8, ISO 100, white balance 6500 K, HDR off" : "Manual: 1/125 s, f/5.6, ISO 200, white balance daylight, HDR off",
        method: "matrix-3x3",
        looMeanDeltaE00: Math.round((loo.reduce((s, v) => s + v, 0) / loo.length) * 1e4) / 1e4,
        looMaxDeltaE00: Math.round(Math.max(...loo) * 1e4) / 1e4,
      },
    };
  });

  // Racks of up to 8 vials, one dye per rack, in the order planned.
  type Rack = { dye: DemoDye; items: Planned[] };
  const racks: Rack[] = [];
  for (const p of planned) {
    const last = racks[racks.length - 1];
    if (last && last.dye === p.dye && last.items.length < 8) last.items.push(p);
    else racks.push({ dye: p.dye, items: [p] });
  }

  const start = new Date("2026-03-02T09:00:00Z").getTime();
  const end = new Date("2026-11-27T17:00:00Z").getTime();
  const photoRows: (typeof photos.$inferInsert)[] = [];
  const measurementRows: NewMeasurement[] = [];
  const conditionRows = new Map<string, typeof conditions.$inferInsert>();
  let serial = 0;

  for (let r = 0; r < racks.length; r++) {
    const rack = racks[r];
    const takenAt = new Date(start + ((end - start) * r) / racks.length);
    const profileIndex = takenAt.getTime() < profileDefs[1].row.validFrom.getTime() ? 0 : 1;
    const camera = CAMERAS[profileIndex];
    const correction = profileDefs[profileIndex].fit.correction;
    const vials: LinearRgb[] = [];
    const photoId = `ph_demo_${String(r + 1).padStart(4, "0")}`;
    // Every fourth rack is the second chemist's; the last rack is hers and still waits for review.
    const lastRack = r === racks.length - 1;
    const author = r % 4 === 1 || lastRack ? chemist2 : chemist;
    rack.items.forEach((item, slot) => {
      const { xyz } = demoColour(item.dye, { alpha: item.solvent.ktAlpha ?? 0, beta: item.solvent.ktBeta ?? 0, piStar: item.solvent.ktPiStar ?? 0, name: item.solvent.name }, item.pH);
      const sampleRgb = xyzD65ToLinearSrgb(xyz);
      const rawExact = mat3MulVec(camera.matrix, sampleRgb);
      const clipped = rawExact.some((v) => v < 0.002 || v > 0.98);
      const raw = rawExact.map((v) => Math.min(0.98, Math.max(0.002, v * (1 + 0.006 * gaussian(random))))) as LinearRgb;
      vials.push(raw);
      const corrected = applyCorrection(correction, raw);
      const cxyz = linearSrgbToXyzD65(corrected);
      const lab = xyzToLab(cxyz, WHITE_POINTS_2DEG.D65);
      const condKey = `${item.solvent.id}|${item.acidBase}|${item.pH}|${item.additive}`;
      if (!conditionRows.has(condKey)) {
        conditionRows.set(condKey, {
          id: `cond_demo_${conditionRows.size + 1}`,
          solventId: item.solvent.id,
          acidBase: item.acidBase,
          ph: item.pH,
          additive: item.additive,
          concentrationUmolL: 20,
          pathLengthMm: 10,
          temperatureC: 23,
        });
      }
      serial++;
      const roll = random();
      const state = lastRack ? "pending" : roll < 0.86 ? "accepted" : roll < 0.95 ? "pending" : "rejected";
      const flags = clipped ? ["out-of-gamut"] : [];
      measurementRows.push({
        id: `ms_demo_${String(serial).padStart(5, "0")}`,
        photoId,
        region: { shape: "rect", x: VIAL.x0 + slot * VIAL.step + 10, y: VIAL.y + 20, w: VIAL.w - 20, h: VIAL.h - 40 },
        dyeId: `dye_${item.dye.code.toLowerCase()}`,
        conditionId: conditionRows.get(condKey)!.id,
        lightingProfileId: profileDefs[profileIndex].row.id,
        rawR: raw[0],
        rawG: raw[1],
        rawB: raw[2],
        x: cxyz[0],
        y: cxyz[1],
        z: cxyz[2],
        l: lab[0],
        a: lab[1],
        b: lab[2],
        illuminant: "D65",
        observer: "CIE 1931 2°",
        pixelCount: (VIAL.w - 20) * (VIAL.h - 40),
        rejectedCount: Math.floor(random() * 40),
        spread: Math.round((0.3 + 0.5 * random()) * 100) / 100,
        flags,
        flagReason: clipped ? "Deeply coloured sample: a channel is at the camera's limit; kept for the record." : null,
        reviewState: state,
        reviewedBy: state === "pending" ? null : admin.id,
        reviewedAt: state === "pending" ? null : new Date(takenAt.getTime() + 3 * 3600 * 1000),
        reviewNote: state === "rejected" ? "Meniscus inside the region; please re-mark the vial lower." : null,
        createdBy: author.id,
        createdAt: new Date(takenAt.getTime() + 20 * 60 * 1000),
      });
    });
    const white = mat3MulVec(camera.matrix, CARD_PATCHES[0].rgb);
    const jpeg = await renderRack(vials, white, random);
    const stored = storage.put(jpeg, "jpg");
    photoRows.push({
      id: photoId,
      storageKey: stored.key,
      sha256: stored.sha256,
      byteSize: stored.byteSize,
      mimeType: "image/jpeg",
      width: IMAGE.w,
      height: IMAGE.h,
      exif: { make: "Demo", model: camera.name, takenAt: takenAt.toISOString(), orientation: 1 },
      originalName: `rack-${rack.dye.code}-${r + 1}.jpg`,
      lightingProfileId: profileDefs[profileIndex].row.id,
      uploadedBy: author.id,
      takenAt,
      createdAt: new Date(takenAt.getTime() + 10 * 60 * 1000),
    });
  }

  db.transaction((tx) => {
    for (const u of DEMO_USERS) tx.insert(users).values({ ...u, passwordHash }).run();
    tx.insert(calibrationTargets)
      .values({
        id: "ct_demo_card",
        name: "Kestrel Bay 8-patch card",
        description: "Demo calibration card; reference values from its (invented) certificate, CIELAB D65.",
        whitePoint: "D65",
        patches: CARD_PATCHES.map((p) => ({ name: p.name, lab: labOfLinear(p.rgb) })),
        gridRows: 2,
        gridColumns: 4,
        source: "Invented certificate of the demo card",
      })
      .run();
    for (const p of profileDefs) tx.insert(lightingProfiles).values(p.row).run();
    // One registered check standard, so the bench's "Check standard" region has something to pick (no readings seeded:
    // the lab's accuracy history starts with the first photo that holds it).
    tx.insert(checkStandards)
      .values({
        id: "cs_demo_tile",
        name: "Kestrel Bay blue check tile (demo)",
        kind: "tile",
        l: 52.4,
        a: -4.1,
        b: -31.6,
        whitePoint: "D65",
        sourceInstrument: "Invented certificate of the demo tile (d/8° spectrophotometer, D65/2°)",
        notes: "Demo data: an invented tile for trying the check-standard region on the bench.",
        createdBy: admin.id,
      })
      .run();
    for (const d of dyeList) {
      tx.insert(dyes)
        .values({
          id: `dye_${d.code.toLowerCase()}`,
          code: d.code,
          name: d.name,
          synonyms: d.synonyms,
          casNumber: null,
          dyeClass: d.dyeClass,
          molarMass: d.molarMass,
          notes: d.notes + (d.pKa !== undefined ? " Changes colour with acid/base." : ""),
          hazards: d.hazards,
          createdBy: chemist.id,
        })
        .run();
    }
    for (const c of conditionRows.values()) tx.insert(conditions).values(c).run();
    for (const p of photoRows) tx.insert(photos).values(p).run();
    for (const m of measurementRows) tx.insert(measurements).values(m).run();

    // Spectra for the first dye of every family, in four solvents.
    const spectrumSolvents = ["Methanol", "Acetonitrile", "Toluene", "Dimethyl sulfoxide"];
    const families = new Set<string>();
    let spectrumSerial = 0;
    for (const d of dyeList) {
      if (families.has(d.dyeClass)) continue;
      families.add(d.dyeClass);
      for (const name of spectrumSolvents) {
        const solvent = solventByName.get(name)!;
        const condKey = `${solvent.id}|neutral|null|`;
        const cond = conditionRows.get(condKey);
        const conditionId = cond?.id ?? `cond_demo_s${++spectrumSerial}`;
        if (!cond) {
          tx.insert(conditions).values({ id: conditionId, solventId: solvent.id, acidBase: "neutral", ph: null, additive: "", concentrationUmolL: 20, pathLengthMm: 10, temperatureC: 23 }).run();
          conditionRows.set(condKey, { id: conditionId, solventId: solvent.id, acidBase: "neutral" });
        }
        const s = demoSpectrum(d, { alpha: solvent.ktAlpha ?? 0, beta: solvent.ktBeta ?? 0, piStar: solvent.ktPiStar ?? 0, name: solvent.name }, null);
        tx.insert(spectra)
          .values({
            id: `sp_demo_${families.size}_${name.toLowerCase().replace(/[^a-z]+/g, "")}`,
            dyeId: `dye_${d.code.toLowerCase()}`,
            conditionId,
            points: s.wavelengths.map((w, i) => [w, Math.round((s.values[i] + 0.002 * gaussian(random)) * 1e4) / 1e4] as [number, number]),
            lambdaMaxNm: lambdaMax(s),
            concentrationUmolL: 20,
            pathLengthMm: 10,
            instrument: "Demo UV-Vis, 1 cm quartz cell",
            createdBy: chemist.id,
          })
          .run();
      }
    }

    // Indicator dyes: spectra of the acid and the base form in water (the conditions of their acid/base vials).
    const water = solventByName.get("Water")!;
    for (const d of dyeList) {
      if (d.pKa === undefined) continue;
      for (const [acidBase, pH, additive] of [["acid", 1.5, "0.03 M HCl"], ["base", 12.5, "0.03 M NaOH"]] as const) {
        const cond = conditionRows.get(`${water.id}|${acidBase}|${pH}|${additive}`);
        if (!cond) continue;
        const s = demoSpectrum(d, { alpha: water.ktAlpha ?? 0, beta: water.ktBeta ?? 0, piStar: water.ktPiStar ?? 0 }, pH);
        const points = s.wavelengths.map((w, i) => [w, Math.round((s.values[i] + 0.002 * gaussian(random)) * 1e4) / 1e4] as [number, number]);
        tx.insert(spectra)
          .values({
            id: `sp_demo_${d.code.toLowerCase()}_water_${acidBase}`,
            dyeId: `dye_${d.code.toLowerCase()}`,
            conditionId: cond.id!,
            points,
            lambdaMaxNm: lambdaMax({ wavelengths: points.map((p) => p[0]), values: points.map((p) => p[1]) }),
            concentrationUmolL: 20,
            pathLengthMm: 10,
            instrument: "Demo UV-Vis, 1 cm quartz cell",
            createdBy: chemist.id,
          })
          .run();
      }
    }

    // A saved solvent panel: the bench's usual eight-vial polarity ladder, neutral, 23 °C, 10 mm cells.
    tx.insert(solventPanels)
      .values({
        id: "sp_demo_ladder",
        name: "Polarity ladder, 8 vials",
        entries: ["Water", "Methanol", "Ethanol", "Acetonitrile", "Dimethyl sulfoxide", "Acetone", "Dichloromethane", "Toluene"].map((name) => ({
          solventId: solventByName.get(name)!.id,
          acidBase: "neutral" as const,
          ph: name === "Water" ? 7 : null,
          concentrationUmolL: 20,
          additive: "",
          additiveConcentrationMolL: null,
          temperatureC: 23,
          pathLengthMm: 10,
          secondSolventId: null,
          secondSolventMoleFraction: null,
        })),
        createdBy: chemist.id,
      })
      .run();

    tx.insert(shortlists)
      .values({ id: "sl_demo_1", ownerId: formulator.id, name: "Solvent-sensing ink, first look", notes: "Violet in dipolar aprotic media, clearly different in alcohols." })
      .run();
    const picks = dyeList.filter((d) => d.dyeClass === "betaine" || d.dyeClass === "merocyanine").slice(0, 3);
    picks.forEach((d, i) =>
      tx.insert(shortlistItems).values({ id: `sli_demo_${i + 1}`, shortlistId: "sl_demo_1", dyeId: `dye_${d.code.toLowerCase()}`, note: "", position: i }).run(),
    );
    recordAudit(tx, {
      actorId: null,
      action: "demo.seed",
      entity: "database",
      after: { dyes: dyeList.length, measurements: measurementRows.length, photos: photoRows.length },
    });
  });

  // The indicator dyes' pH series arrive grouped (their fits are computed on first read, or by
  // scripts/precompute-models.ts after a demo start).
  groupImplicitSeries(db, { actorId: chemist.id });

  // Solvent models and their predictions, so search with predictions answers at once (≈ 1 s of CPU per
  // dye; off by default so tests that only need the measurements stay fast).
  if (options.models) ensureAllDyeModels(db);

  return { users: DEMO_USERS.length, dyes: dyeList.length, measurements: measurementRows.length, photos: photoRows.length };
}
