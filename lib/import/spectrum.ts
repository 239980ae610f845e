/**
 * Checks an absorbance spectrum sent by a person (CSV file) or a lab script (JSON points) before it is
 * stored: wavelength units (nm; µm and cm⁻¹ recognised and converted), one direction of travel, no
 * wavelength twice, the visible 400–700 nm covered, a step fine enough for the CIE 1 nm summation, and
 * plain numeric absorbance. Every problem names its line (the header is line 1) or point and its column.
 * Pure: no database, no framework.
 */
import Papa from "papaparse";
import type { SampledSpectrum } from "../color/spectrum";
import type { RowProblem } from "./csv";

export type WavelengthUnit = "nm" | "µm" | "cm⁻¹";
export const WAVELENGTH_UNITS: readonly WavelengthUnit[] = ["nm", "µm", "cm⁻¹"];

/** The range a stored spectrum must cover, so its colour does not rest on extrapolated ends (CIE 015:2018 weights are largest here). */
export const REQUIRED_RANGE_NM: readonly [number, number] = [400, 700];

/**
 * Largest gap between samples inside 400–700 nm. CIE 015:2018 §7.2 computes colour at 1 nm or 5 nm
 * intervals; we interpolate linearly to 1 nm and accept up to 10 nm (our limit: wider gaps can hide a
 * narrow band's maximum).
 */
export const MAX_STEP_NM = 10;

/** A step that varies by more than this factor between samples is reported as non-uniform (our threshold). */
export const UNIFORM_STEP_RATIO = 1.5;

/** Decadic absorbance beyond this is not a photometric reading (instruments stop near 4–6): refused (our limit). */
export const MAX_ABSORBANCE = 10;
/** Absorbance above this is usually stray-light limited on a bench spectrophotometer (common practice, no source): warned. */
export const SATURATION_ABSORBANCE = 4;
/** Baseline dips below zero past this are not noise: refused (our limit). */
export const MIN_ABSORBANCE = -0.5;

export const MAX_SPECTRUM_POINTS = 20_000;

export type SpectrumReport = {
  points: number;
  /** Unit the wavelengths were sent in; they are stored in nm. */
  unit: WavelengthUnit;
  /** Whether the file ran from long to short wavelengths (it is stored ascending). */
  descending: boolean;
  rangeNm: [number, number];
  /** Median, smallest and largest step between neighbouring samples, nm (after conversion). */
  stepNm: { median: number; min: number; max: number };
  uniform: boolean;
};

export type SpectrumCheck =
  | { ok: true; spectrum: SampledSpectrum; report: SpectrumReport; warnings: string[] }
  | { ok: false; problems: RowProblem[]; warnings: string[] };

type Sample = { line: number; x: number; a: number };

const fmt = (v: number, digits = 0) => Number(v.toFixed(digits)).toString();

const WAVENUMBER_HEADER = /wave\s*number|cm\s*(-|−|⁻)\s*1|cm⁻¹|cm\^-1|1\s*\/\s*cm/i;
const MICROMETRE_HEADER = /µm|μm|\bum\b|_um\b|micron/i;
const NANOMETRE_HEADER = /nm|nanomet/i;
const WAVELENGTH_HEADER = /wave\s*length|lambda|λ|^wl\b|^nm$/i;
const ABSORBANCE_HEADER = /^(abs|absorbance|a|od|optical density)\b|absorbance/i;
const TRANSMITTANCE_HEADER = /transmi|%\s*t\b|^t\b|^t\s*\(/i;

function unitOfHeader(header: string): WavelengthUnit | null {
  if (WAVENUMBER_HEADER.test(header)) return "cm⁻¹";
  if (MICROMETRE_HEADER.test(header)) return "µm";
  if (NANOMETRE_HEADER.test(header)) return "nm";
  return null;
}

/** The unit the values themselves suggest: UV–visible–NIR work spans about 150–3,000 nm, 0.15–3 µm or 3,300–67,000 cm⁻¹. */
function unitOfValues(xs: readonly number[]): WavelengthUnit | null {
  const sorted = [...xs].sort((p, q) => p - q);
  const median = sorted[Math.floor(sorted.length / 2)];
  if (median >= 0.15 && median <= 3) return "µm";
  if (median >= 150 && median <= 3000) return "nm";
  if (median > 3000 && median <= 70000) return "cm⁻¹";
  return null;
}

function toNm(x: number, unit: WavelengthUnit): number {
  if (unit === "nm") return x;
  if (unit === "µm") return x * 1000;
  return 1e7 / x;
}

function parseNumber(raw: string, decimalComma: boolean): number | null {
  const s = raw.trim();
  const normalised = decimalComma ? s.replace(",", ".") : s;
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(normalised)) return null;
  return Number(normalised);
}

/**
 * Reads an absorbance CSV: a header row naming a wavelength column (e.g. `wavelength_nm`,
 * "Wavelength (nm)", `wavelength_um`, `wavenumber_cm-1`) and an absorbance column (e.g. `absorbance`,
 * "Abs"), then one sample per line. Comma, semicolon or tab separated; with semicolons or tabs a decimal
 * comma is read as a decimal point. Other columns are ignored.
 */
export function checkAbsorbanceCsv(text: string): SpectrumCheck {
  const body = text.replace(/^\uFEFF/, "");
  if (body.trim() === "") {
    return { ok: false, problems: [{ line: 1, column: "file", message: "The file is empty; give a header row such as wavelength_nm,absorbance and one row per wavelength." }], warnings: [] };
  }
  const parsed = Papa.parse<string[]>(body, { header: false, skipEmptyLines: false });
  const delimiter = parsed.meta.delimiter;
  const decimalComma = delimiter === ";" || delimiter === "\t";
  const rows = parsed.data;
  const headerIndex = rows.findIndex((r) => r.some((c) => c.trim() !== ""));
  const header = rows[headerIndex].map((h) => h.trim());
  const headerLine = headerIndex + 1;
  if (header.every((h) => parseNumber(h, decimalComma) !== null)) {
    return {
      ok: false,
      problems: [{ line: headerLine, column: "header", message: "The first line holds numbers, not column names; add a header row such as wavelength_nm,absorbance so the units are known." }],
      warnings: [],
    };
  }
  const wlIndex = header.findIndex((h) => WAVELENGTH_HEADER.test(h) || WAVENUMBER_HEADER.test(h));
  const absIndex = header.findIndex((h, i) => i !== wlIndex && ABSORBANCE_HEADER.test(h));
  const problems: RowProblem[] = [];
  if (wlIndex < 0) problems.push({ line: headerLine, column: "header", message: `No column names the wavelength (the header is “${header.join(delimiter).slice(0, 80)}”); name it wavelength_nm, wavelength_um or wavenumber_cm-1.` });
  if (absIndex < 0) {
    const transmittance = header.find((h) => TRANSMITTANCE_HEADER.test(h));
    problems.push({
      line: headerLine,
      column: transmittance ?? "header",
      message: transmittance
        ? `The column “${transmittance}” looks like transmittance; convert it to decadic absorbance, A = −log10(T), and name the column absorbance.`
        : "No column names the absorbance; name it absorbance (decadic, as measured).",
    });
  }
  if (problems.length) return { ok: false, problems, warnings: [] };
  const wlColumn = header[wlIndex];
  const absColumn = header[absIndex];
  const samples: Sample[] = [];
  for (let i = headerIndex + 1; i < rows.length; i++) {
    const cells = rows[i];
    if (cells.every((c) => c.trim() === "")) continue;
    const line = i + 1;
    if (cells.length > header.length) {
      problems.push({ line, column: "file", message: `The line has ${cells.length} values but the header names ${header.length} columns; use a dot, not a comma, as the decimal separator in a comma-separated file.` });
      continue;
    }
    const x = parseNumber(cells[wlIndex] ?? "", decimalComma);
    const a = parseNumber(cells[absIndex] ?? "", decimalComma);
    if (x === null) problems.push({ line, column: wlColumn, message: cells[wlIndex]?.trim() ? `“${cells[wlIndex].trim().slice(0, 20)}” is not a number.` : "The wavelength is missing." });
    if (a === null) {
      const raw = cells[absIndex]?.trim() ?? "";
      problems.push({ line, column: absColumn, message: raw ? `“${raw.slice(0, 20)}” is not a number; give the absorbance as a plain number (an instrument's overflow mark cannot be used).` : "The absorbance is missing." });
    }
    if (x !== null && a !== null) samples.push({ line, x, a });
    if (samples.length + problems.length > MAX_SPECTRUM_POINTS) {
      return { ok: false, problems: [{ line, column: "file", message: `The file has more than ${MAX_SPECTRUM_POINTS} rows; send at most one row per 0.1 nm.` }], warnings: [] };
    }
  }
  return checkSamples(samples, problems, { declared: unitOfHeader(wlColumn), wlColumn, absColumn, where: "line", headerLine });
}

/**
 * The same checks for points sent as JSON, `[[wavelength, absorbance], …]` in `unit` (nm unless said).
 * Problems are named by point number (from 1) and the field, "wavelength" or "absorbance".
 */
export function checkAbsorbancePoints(points: readonly (readonly [number, number])[], unit: WavelengthUnit = "nm"): SpectrumCheck {
  const problems: RowProblem[] = [];
  const samples: Sample[] = [];
  points.forEach(([x, a], i) => {
    if (!Number.isFinite(x)) problems.push({ line: i + 1, column: "wavelength", message: "The wavelength is not a finite number." });
    if (!Number.isFinite(a)) problems.push({ line: i + 1, column: "absorbance", message: "The absorbance is not a finite number." });
    if (Number.isFinite(x) && Number.isFinite(a)) samples.push({ line: i + 1, x, a });
  });
  return checkSamples(samples, problems, { declared: unit, wlColumn: "wavelength", absColumn: "absorbance", where: "point", headerLine: null });
}

function checkSamples(
  samples: Sample[],
  problems: RowProblem[],
  { declared, wlColumn, absColumn, where, headerLine }: { declared: WavelengthUnit | null; wlColumn: string; absColumn: string; where: "line" | "point"; headerLine: number | null },
): SpectrumCheck {
  const warnings: string[] = [];
  const firstLine = headerLine ?? 1;
  if (samples.length + problems.length < 2) {
    return { ok: false, problems: [...problems, { line: firstLine, column: "file", message: "The spectrum has fewer than two samples; give the absorbance at every wavelength from 400 nm or below to 700 nm or above." }], warnings };
  }
  // Units: the header's word, checked against the values; or the values alone.
  const xs = samples.map((s) => s.x);
  const byValues = samples.length > 0 ? unitOfValues(xs) : null;
  let unit: WavelengthUnit | null = declared;
  const range = samples.length > 0 ? `${fmt(Math.min(...xs), 2)}–${fmt(Math.max(...xs), 2)}` : "";
  if (declared && byValues && declared !== byValues) {
    problems.push({
      line: headerLine ?? 1,
      column: wlColumn,
      message: `The ${where === "line" ? "header says" : "unit given is"} ${declared}, but the values (${range}) look like ${byValues}; ${where === "line" ? "rename the column" : "send the matching unit"} or convert the values.`,
    });
    return { ok: false, problems, warnings };
  }
  if (!unit) unit = byValues;
  if (!unit) {
    problems.push({ line: headerLine ?? 1, column: wlColumn, message: `The wavelengths (${range}) fit no unit of UV–visible work; give them in nm (e.g. 380–780).` });
    return { ok: false, problems, warnings };
  }
  for (const s of samples) {
    if (!(s.x > 0)) problems.push({ line: s.line, column: wlColumn, message: `A wavelength of ${s.x} ${unit} is not positive.` });
    if (s.a > MAX_ABSORBANCE) problems.push({ line: s.line, column: absColumn, message: `An absorbance of ${s.a} is beyond any photometer (above ${MAX_ABSORBANCE}); dilute the sample or shorten the path and measure again.` });
    if (s.a < MIN_ABSORBANCE) problems.push({ line: s.line, column: absColumn, message: `An absorbance of ${s.a} is far below zero; check the blank (baseline) and measure again.` });
  }
  // One direction of travel; nothing twice.
  const seen = new Map<number, number>();
  for (const s of samples) {
    const first = seen.get(s.x);
    if (first !== undefined) problems.push({ line: s.line, column: wlColumn, message: `The wavelength ${s.x} ${unit} is already on ${where} ${first}; keep one absorbance per wavelength.` });
    else seen.set(s.x, s.line);
  }
  const direction = samples.length > 1 ? Math.sign(samples[1].x - samples[0].x) : 1;
  for (let i = 1; i < samples.length; i++) {
    const d = Math.sign(samples[i].x - samples[i - 1].x);
    if (d !== 0 && d !== direction) {
      problems.push({
        line: samples[i].line,
        column: wlColumn,
        message: `${samples[i].x} ${unit} breaks the order (the ${where === "line" ? "file" : "list"} runs ${direction > 0 ? "upwards" : "downwards"} and ${where} ${samples[i - 1].line} has ${samples[i - 1].x}); sort by wavelength or remove the stray ${where === "line" ? "row" : "point"}.`,
      });
      break;
    }
  }
  if (problems.length) return { ok: false, problems: sortProblems(problems), warnings };

  const converted = samples.map((s) => ({ line: s.line, nm: toNm(s.x, unit), a: s.a })).sort((p, q) => p.nm - q.nm);
  const nm = converted.map((c) => c.nm);
  const lo = nm[0];
  const hi = nm[nm.length - 1];
  const [needLo, needHi] = REQUIRED_RANGE_NM;
  if (lo > needLo || hi < needHi) {
    const missing = [lo > needLo ? `${needLo}–${fmt(lo, 1)} nm` : null, hi < needHi ? `${fmt(hi, 1)}–${needHi} nm` : null].filter(Boolean).join(" and ");
    problems.push({
      line: firstLine,
      column: wlColumn,
      message: `The spectrum covers ${fmt(lo, 1)}–${fmt(hi, 1)} nm and misses ${missing} of the visible ${needLo}–${needHi} nm; measure from ${needLo} nm or below to ${needHi} nm or above.`,
    });
    return { ok: false, problems, warnings };
  }
  const steps = nm.slice(1).map((v, i) => v - nm[i]);
  const sortedSteps = [...steps].sort((p, q) => p - q);
  const stepNm = { median: sortedSteps[Math.floor(sortedSteps.length / 2)], min: sortedSteps[0], max: sortedSteps[sortedSteps.length - 1] };
  // The widest gap that touches the visible range decides whether the colour can be computed.
  let worst = -1;
  for (let i = 1; i < nm.length; i++) {
    if (nm[i] < needLo || nm[i - 1] > needHi) continue;
    if (worst < 0 || nm[i] - nm[i - 1] > nm[worst] - nm[worst - 1]) worst = i;
  }
  if (worst > 0 && nm[worst] - nm[worst - 1] > MAX_STEP_NM) {
    const a = converted[worst - 1];
    const b = converted[worst];
    problems.push({
      line: Math.max(a.line, b.line),
      column: wlColumn,
      message: `The gap between ${fmt(a.nm, 1)} and ${fmt(b.nm, 1)} nm (${where}s ${Math.min(a.line, b.line)} and ${Math.max(a.line, b.line)}) is ${fmt(b.nm - a.nm, 1)} nm; inside 400–700 nm measure at least every ${MAX_STEP_NM} nm.`,
    });
    return { ok: false, problems, warnings };
  }
  const uniform = stepNm.max <= UNIFORM_STEP_RATIO * stepNm.min + 1e-9;
  if (!uniform) {
    warnings.push(
      unit === "cm⁻¹"
        ? `Sent in cm⁻¹ at an even wavenumber step, so the step in nm grows with the wavelength (${fmt(stepNm.min, 2)}–${fmt(stepNm.max, 2)} nm); fine for the colour.`
        : `The step is not uniform (${fmt(stepNm.min, 2)}–${fmt(stepNm.max, 2)} nm, median ${fmt(stepNm.median, 2)} nm); the colour interpolates linearly between samples.`,
    );
  }
  if (unit !== "nm") warnings.push(`Wavelengths were sent in ${unit} and are stored in nm (${unit === "µm" ? "× 1000" : "λ = 10⁷ / ν̃"}).`);
  const saturated = converted.filter((c) => c.a > SATURATION_ABSORBANCE);
  if (saturated.length) warnings.push(`${saturated.length} ${saturated.length === 1 ? "sample is" : "samples are"} above absorbance ${SATURATION_ABSORBANCE}, where stray light usually limits the reading; the band top may be flattened.`);
  return {
    ok: true,
    spectrum: { wavelengths: nm, values: converted.map((c) => c.a) },
    report: { points: converted.length, unit, descending: direction < 0 !== (unit === "cm⁻¹"), rangeNm: [lo, hi], stepNm, uniform },
    warnings,
  };
}

function sortProblems(problems: RowProblem[]): RowProblem[] {
  return [...problems].sort((p, q) => p.line - q.line);
}

/**
 * One sentence for a refusal: the first problem with its line (or point) and column, and how many
 * there are. Line 0 marks a problem with a field rather than the data (the dye, the solvent).
 */
export function problemsSentence(problems: readonly RowProblem[], where: "line" | "point"): string {
  const p = problems[0];
  const place =
    p.line === 0 ? `${p.column}: ` : p.column === "file" || p.column === "header" ? `${where === "line" ? "Line" : "Point"} ${p.line}: ` : `${where === "line" ? "Line" : "Point"} ${p.line}, column ${p.column}: `;
  const more = problems.length > 1 ? ` (${problems.length} problems in all, each listed; nothing was stored.)` : " Nothing was stored.";
  return `${place}${p.message}${more}`;
}
