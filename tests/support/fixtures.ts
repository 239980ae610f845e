import fs from "node:fs";
import path from "node:path";
import Papa from "papaparse";

export const FIXTURES = path.join(process.cwd(), "tests", "fixtures");

export function readFixtureCsv(file: string): Record<string, string>[] {
  const parsed = Papa.parse<Record<string, string>>(fs.readFileSync(path.join(FIXTURES, file), "utf8"), { header: true, skipEmptyLines: true });
  return parsed.data;
}
