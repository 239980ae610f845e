import { z } from "zod";
import { db } from "@/db/client";
import { listAllMeasurements } from "@/db/queries/measurements";
import { REVIEW_STATES } from "@/db/schema";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
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
