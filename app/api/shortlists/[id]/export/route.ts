import { db } from "@/db/client";
import { findShortlist, shortlistConditionColours, shortlistDyes } from "@/db/queries/shortlists";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { csvFileName, shortlistToCsv, summariseByCondition } from "@/lib/search/shortlist-csv";

/** GET /api/shortlists/:id/export: the shortlist as CSV, one row per dye and condition with its CIELAB and the solvent parameters. */
export const GET = apiRoute<never, never, { id: string }>({ access: ANY_ROLE }, async ({ params }) => {
  const handle = db();
  const found = findShortlist(handle, { id: params.id });
  if (!found) throw new AppError("not_found", "No shortlist with this id; it may have been deleted.");
  const csv = shortlistToCsv(
    shortlistDyes(handle, { shortlistId: params.id }).map(({ item, dye, accepted }) => ({
      code: dye.code,
      name: dye.name,
      dyeClass: dye.dyeClass,
      casNumber: dye.casNumber,
      molarMass: dye.molarMass,
      acceptedMeasurements: accepted,
      note: item.note,
      hazards: dye.hazards,
    })),
    summariseByCondition(shortlistConditionColours(handle, { shortlistId: params.id })),
  );
  return new Response(csv, {
    headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${csvFileName(found.list.name)}"` },
  });
});
