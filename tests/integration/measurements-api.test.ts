/**
 * GET /api/measurements (CONTRACT.md: every accepted measurement, JSON or CSV) and the server-side
 * filters, sorting and paging behind the /measurements table.
 */
import Papa from "papaparse";
import { beforeAll, describe, expect, it } from "vitest";
import { GET as getMeasurements } from "@/app/api/measurements/route";
import { db } from "@/db/client";
import { listMeasurements } from "@/db/queries/measurements";
import { conditions, dyes, measurements } from "@/db/schema";
import { buildWorld, PEOPLE, tokenFor } from "../support/world";

beforeAll(async () => {
  await buildWorld();
  const h = db();
  h.insert(dyes).values({ id: "dye_m2", code: "=HYPERLINK(1)", name: "Formula Red", dyeClass: "azo" }).run();
  h.insert(conditions).values({ id: "cond_m_acid", solventId: "solv-water", acidBase: "acid", ph: 2 }).run();
  h.insert(conditions).values({ id: "cond_m_dmso", solventId: "solv-dimethyl-sulfoxide", acidBase: "neutral" }).run();
  const base = { rawR: 0.2, rawG: 0.1, rawB: 0.3, x: 10, y: 8, z: 20, pixelCount: 1000, rejectedCount: 3, spread: 0.4 };
  const rows = [
    { id: "ms_m1", dyeId: "dye_t1", conditionId: "cond_m_acid", l: 50, a: 40, b: 0, reviewState: "accepted" as const, createdBy: PEOPLE.chemist.id, createdAt: new Date("2026-05-01T10:00:00Z") },
    { id: "ms_m2", dyeId: "dye_t1", conditionId: "cond_m_dmso", l: 30, a: 0, b: -50, reviewState: "accepted" as const, createdBy: PEOPLE.chemist2.id, createdAt: new Date("2026-06-01T10:00:00Z") },
    { id: "ms_m3", dyeId: "dye_m2", conditionId: "cond_m_dmso", l: 70, a: -20, b: 20, uL: 0.31, uA: 0.42, uB: 0.53, uDeltaE00: 0.64, reviewState: "accepted" as const, createdBy: PEOPLE.chemist.id, createdAt: new Date("2026-07-01T10:00:00Z") },
    { id: "ms_m4", dyeId: "dye_m2", conditionId: "cond_m_acid", l: 60, a: 10, b: 10, reviewState: "rejected" as const, createdBy: PEOPLE.chemist.id, createdAt: new Date("2026-07-02T10:00:00Z") },
  ];
  for (const r of rows) h.insert(measurements).values({ ...base, ...r }).run();
});

const call = async (query: string, who: "formulator" | "chemist" = "formulator") => getMeasurements(new Request(`http://localhost:3000/api/measurements${query}`, { headers: { authorization: `Bearer ${tokenFor(who)}` } }));

describe("GET /api/measurements", () => {
  it("returns every accepted measurement, and only those, in the contract's shape", async () => {
    const res = await call("");
    expect(res.status).toBe(200);
    const body = await res.json();
    const ids = body.measurements.map((m: { id: string }) => m.id);
    expect(ids).toEqual(expect.arrayContaining(["ms_m1", "ms_m2", "ms_m3"]));
    expect(ids).not.toContain("ms_m4");
    expect(ids).not.toContain("ms_t1"); // pending in the shared world
    const m1 = body.measurements.find((m: { id: string }) => m.id === "ms_m1");
    expect(m1).toMatchObject({
      id: "ms_m1",
      dye: { id: "dye_t1", code: "T-001", name: "Test Violet" },
      lab: [50, 40, 0],
      condition: { solvent: "Water", medium: "protic", acidBase: "acid", pH: 2 },
      illuminant: "D65",
    });
    // C*ab = √(a² + b²), hab = atan2(b, a) in degrees (CIE 015:2018 §8.2.1).
    const m2 = body.measurements.find((m: { id: string }) => m.id === "ms_m2");
    expect(m2.lch[1]).toBeCloseTo(50, 10);
    expect(m2.lch[2]).toBeCloseTo(270, 10);
    expect(m2.condition).toMatchObject({ solvent: "Dimethyl sulfoxide", medium: "dipolar-aprotic", pH: null });
  });

  it("filters by dyeId", async () => {
    const body = await (await call("?dyeId=dye_m2")).json();
    expect(body.measurements.map((m: { id: string }) => m.id)).toEqual(["ms_m3"]);
  });

  it("exports CSV with a header row, one line per measurement and formula-looking text defused", async () => {
    const res = await call("?dyeId=dye_m2&format=csv");
    expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
    const parsed = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true });
    expect(parsed.data).toHaveLength(1);
    expect(parsed.data[0]).toMatchObject({ id: "ms_m3", dye_code: "'=HYPERLINK(1)", solvent: "Dimethyl sulfoxide", medium: "dipolar-aprotic", L: "70", a: "-20", b: "20", review_state: "accepted" });
  });

  it("carries each colour's standard uncertainties u(L*), u(a*), u(b*) and ± ΔE00 in columns named with their unit, empty when not recorded", async () => {
    const parsed = Papa.parse<Record<string, string>>(await (await call("?format=csv")).text(), { header: true, skipEmptyLines: true });
    expect(parsed.meta.fields).toEqual(expect.arrayContaining(["u_L_cielab", "u_a_cielab", "u_b_cielab", "u_delta_e00"]));
    expect(parsed.data.find((r) => r.id === "ms_m3")).toMatchObject({ u_L_cielab: "0.31", u_a_cielab: "0.42", u_b_cielab: "0.53", u_delta_e00: "0.64" });
    expect(parsed.data.find((r) => r.id === "ms_m2")).toMatchObject({ u_L_cielab: "", u_delta_e00: "" });
  });

  it("answers 422 naming the field for a bad format or date, and 401 without credentials", async () => {
    const bad = await call("?format=xml");
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.message).toMatch(/format/);
    expect((await call("?from=2026-13-45")).status).toBe(422);
    expect((await getMeasurements(new Request("http://localhost:3000/api/measurements"))).status).toBe(401);
  });
});

describe("listMeasurements (the table)", () => {
  it("filters by medium, condition, state, date and author; sorts by chroma and hue; pages", () => {
    const ids = (r: ReturnType<typeof listMeasurements>) => r.rows.map((x) => x.m.id);
    expect(ids(listMeasurements(db(), { filters: { medium: "dipolar-aprotic" }, sort: "l", direction: "asc" }))).toEqual(["ms_m2", "ms_m3"]);
    expect(ids(listMeasurements(db(), { filters: { acidBase: "acid", state: "rejected" } }))).toEqual(["ms_m4"]);
    expect(ids(listMeasurements(db(), { filters: { from: new Date("2026-06-01T00:00:00Z"), to: new Date("2026-07-02T00:00:00Z") }, sort: "measuredAt", direction: "asc" }))).toEqual(["ms_m2", "ms_m3"]);
    expect(ids(listMeasurements(db(), { filters: { authorId: PEOPLE.chemist2.id, dyeId: "dye_t1" } }))).toEqual(["ms_m2"]);
    const byChroma = listMeasurements(db(), { filters: { state: "accepted", dyeId: "dye_t1" }, sort: "c", direction: "desc" });
    expect(byChroma.rows.map((r) => Math.round(r.chroma))).toEqual([50, 40]);
    const byHue = listMeasurements(db(), { filters: { state: "accepted" }, sort: "h", direction: "asc" });
    expect(byHue.rows.map((r) => Math.round(r.hue))).toEqual([0, 135, 270]);
    const page2 = listMeasurements(db(), { filters: {}, sort: "measuredAt", direction: "asc", page: 2, pageSize: 2 });
    expect(page2.total).toBeGreaterThanOrEqual(5);
    expect(page2.rows).toHaveLength(2);
  });
});
