import { z } from "zod";
import { db } from "@/db/client";
import { prepareInstrumentMeasurements, saveInstrumentMeasurements } from "@/db/queries/bench";
import { listAllMeasurements } from "@/db/queries/measurements";
import { REVIEW_STATES } from "@/db/schema";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE, BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { instrumentBatchSchema } from "@/lib/validation/instrument";
import { filterParams, toFilters } from "./filters";
import { measurementsCsv, measurementJson } from "./serialize";

const query = filterParams.extend({
  format: z.enum(["json", "csv"]).optional().default("json"),
  /** Accepted only unless asked otherwise ("any" for every state). */
  state: z.enum([...REVIEW_STATES, "any"]).optional().default("accepted"),
});

/**
 * Every accepted measurement (or those of `state`), filtered, as JSON or CSV (CIELAB D65 relative,
 * CIE 1931 2° observer).
 */
export const GET = apiRoute({ access: ANY_ROLE, query }, async ({ query: q, user }) => {
  const rows = listAllMeasurements(db(), toFilters(q, q.state === "any" ? undefined : q.state, user.id));
  if (q.format === "csv") {
    const stamp = new Date().toISOString().slice(0, 10);
    return new Response(measurementsCsv(rows), {
      headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="solvatlas-measurements-${stamp}.csv"` },
    });
  }
  return { measurements: rows.map(measurementJson) };
});

/**
 * Colours measured with an instrument (chemists, admins): CIELAB with its white point (D65 or D50,
 * adapted to D65 for storage) and the CIE 1931 2° observer, a dye, a condition and the instrument.
 * One object, or {"measurements": [...]} stored all or nothing. They wait for review like colours
 * from photos; flagged ones (L* above 100, disagreeing replicates) need a flagReason.
 */
export const POST = apiRoute({ access: BENCH_ROLES, body: instrumentBatchSchema }, async ({ body, user }) => {
  const single = !("measurements" in body);
  const inputs = single ? [body] : body.measurements;
  const handle = db();
  const prepared = prepareInstrumentMeasurements(handle, inputs);
  const bad = prepared.map((p, i) => (p.ok ? null : { i, errors: p.errors })).filter((p) => p !== null);
  if (bad.length > 0) {
    const first = bad[0];
    throw new AppError(
      "invalid_input",
      `${single ? "" : `Measurement ${first.i + 1}: `}${first.errors[0].message}${bad.length > 1 ? ` (${bad.length} measurements have problems; nothing was stored.)` : ""}`,
      Object.fromEntries(bad.flatMap((b) => b.errors.map((e) => [single ? e.field : `${b.i}.${e.field}`, [e.message]]))),
    );
  }
  const ids = saveInstrumentMeasurements(handle, { actorId: user.id, items: prepared.map((p) => (p as Extract<(typeof prepared)[number], { ok: true }>).item) });
  const stored = listAllMeasurements(handle, { authorId: user.id, state: "pending" }).filter((r) => ids.includes(r.m.id));
  const json = ids.map((id) => measurementJson(stored.find((r) => r.m.id === id)!));
  return Response.json(single ? { measurement: json[0] } : { measurements: json }, { status: 201 });
});
