/**
 * Formula injection in CSV exports (issue 11, defect 3). The rule checked is OWASP's "CSV Injection"
 * advice: a text cell starting with = + - @ (or tab / carriage return) is written with a leading
 * apostrophe so a spreadsheet shows it as text; numbers are left as numbers.
 */
import Papa from "papaparse";
import { beforeAll, describe, expect, it } from "vitest";
import { GET as exportShortlist } from "@/app/api/shortlists/[id]/export/route";
import { createShortlistAction } from "@/app/actions/shortlists";
import { db } from "@/db/client";
import { dyes } from "@/db/schema";
import { actAs, buildWorld, form, tokenFor } from "../support/world";

const FORMULAS = ["=HYPERLINK(\"http://evil.example\",\"x\")", "+1+cmd|' /C calc'!A0", "-2+3", "@SUM(1,2)", "\t=1+1"];

beforeAll(async () => {
  await buildWorld();
  db().insert(dyes).values({ id: "dye_csv", code: "=CSV-1", name: "@Formula Red", dyeClass: "azo", hazards: "-irritant" }).run();
});

describe("shortlist CSV export", () => {
  it("writes no cell a spreadsheet would run as a formula, and keeps numbers as numbers", async () => {
    await actAs("chemist");
    const made = await createShortlistAction(null, form({ name: "Risky", notes: "", dyeId: "dye_csv", note: FORMULAS.join(" ") }));
    expect(made).toMatchObject({ ok: true });
    const id = (made?.data as { id: string }).id;
    const res = await exportShortlist(new Request(`http://localhost:3000/api/shortlists/${id}/export`, { headers: { authorization: `Bearer ${tokenFor("chemist")}` } }), {
      params: Promise.resolve({ id }),
    });
    expect(res.status).toBe(200);
    const text = await res.text();
    const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
    for (const row of rows) for (const cell of row) expect(cell, `cell ${JSON.stringify(cell)}`).not.toMatch(/^[=+\-@\t\r]/);
    const [header, line] = rows;
    const record = Object.fromEntries(header.map((h, i) => [h, line[i]]));
    expect(record.code).toBe("'=CSV-1");
    expect(record.name).toBe("'@Formula Red");
    expect(record.hazards).toBe("'-irritant");
    expect(record.note.startsWith("'=HYPERLINK")).toBe(true);
    expect(record.accepted_measurements).toBe("0");
    // One CSV dialect for every export: CRLF line ends, as the measurements export (RFC 4180 §2).
    expect(text).toContain("\r\n");
  });
});
