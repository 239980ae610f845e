/**
 * Reads a calibration card's patch list from CSV: a header row naming the columns name, L*, a*, b*
 * and white point (D65 or D50), one patch per row. Every problem is reported with its line and
 * column so the admin can fix the file. Pure.
 */
import Papa from "papaparse";
import type { Lab } from "../color/types";

export type CsvPatch = { name: string; lab: Lab };
export type CsvResult = { ok: true; whitePoint: "D65" | "D50"; patches: CsvPatch[] } | { ok: false; errors: string[] };

const HEADERS: Record<string, "name" | "l" | "a" | "b" | "white"> = {
  name: "name",
  patch: "name",
  "l*": "l",
  l: "l",
  "a*": "a",
  a: "a",
  "b*": "b",
  b: "b",
  "white point": "white",
  white: "white",
  whitepoint: "white",
  illuminant: "white",
};

const RANGES = { l: [0, 100], a: [-128, 128], b: [-128, 128] } as const;

export function parseTargetCsv(text: string): CsvResult {
  const parsed = Papa.parse<string[]>(text.trim(), { skipEmptyLines: true });
  const rows = parsed.data;
  if (rows.length < 2) return { ok: false, errors: ["The file needs a header row (name, L*, a*, b*, white point) and at least one patch row."] };
  const columns = rows[0].map((h) => HEADERS[h.trim().toLowerCase()]);
  const index = (key: "name" | "l" | "a" | "b" | "white") => columns.indexOf(key);
  const missing = (["name", "l", "a", "b", "white"] as const).filter((k) => index(k) < 0);
  if (missing.length) {
    const labels = { name: "name", l: "L*", a: "a*", b: "b*", white: "white point" };
    return { ok: false, errors: [`Line 1: the header has no ${missing.map((m) => labels[m]).join(", ")} column; name the columns name, L*, a*, b*, white point.`] };
  }
  const errors: string[] = [];
  const patches: CsvPatch[] = [];
  const whites = new Set<string>();
  const names = new Set<string>();
  rows.slice(1).forEach((row, i) => {
    const line = i + 2;
    const name = (row[index("name")] ?? "").trim();
    if (!name) errors.push(`Line ${line}, column ${index("name") + 1}: the patch has no name.`);
    else if (names.has(name)) errors.push(`Line ${line}, column ${index("name") + 1}: “${name}” is used twice; give every patch its own name.`);
    names.add(name);
    const lab = (["l", "a", "b"] as const).map((k) => {
      const raw = (row[index(k)] ?? "").trim().replace(",", ".");
      const v = Number(raw);
      const [min, max] = RANGES[k];
      if (raw === "" || !Number.isFinite(v) || v < min || v > max) {
        errors.push(`Line ${line}, column ${index(k) + 1}: “${raw}” is not a ${k === "l" ? "L*" : `${k}*`} value from ${min} to ${max}.`);
      }
      return v;
    }) as Lab;
    const white = (row[index("white")] ?? "").trim().toUpperCase();
    if (white !== "D65" && white !== "D50") errors.push(`Line ${line}, column ${index("white") + 1}: “${white}” is not a white point; write D65 or D50.`);
    else whites.add(white);
    patches.push({ name, lab });
  });
  if (whites.size > 1) errors.push("The patches name both D65 and D50; one card has one white point, so convert the values or split the file.");
  if (errors.length) return { ok: false, errors: errors.slice(0, 20) };
  return { ok: true, whitePoint: [...whites][0] as "D65" | "D50", patches };
}
