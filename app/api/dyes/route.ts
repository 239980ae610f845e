import { z } from "zod";
import { db } from "@/db/client";
import { addDye, listDyesCached } from "@/db/queries/dyes";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE, BENCH_ROLES } from "@/lib/auth/roles";
import { dyeCreateJsonSchema } from "@/lib/validation/dye";
import { dyeJson } from "./serialize";
import { searchDyesByText } from "@/lib/search/text";

const query = z.object({
  q: z.string().max(200, "q is at most 200 characters").optional().default(""),
  limit: z.coerce.number({ error: "limit must be a whole number" }).int("limit must be a whole number").min(1).max(500).optional().default(500),
});

export const GET = apiRoute({ access: ANY_ROLE, query }, async ({ query }) => {
  const all = listDyesCached(db());
  const hits = searchDyesByText(all, query.q, query.limit);
  return {
    dyes: hits.map((d) => ({
      id: d.id,
      code: d.code,
      name: d.name,
      class: d.dyeClass,
      synonyms: d.synonyms,
      casNumber: d.casNumber,
      molarMass: d.molarMass,
      measurements: d.acceptedCount,
    })),
  };
});

/** Adds a dye (chemists, admins): the catalogue form's checks, a free code, an audit entry. */
export const POST = apiRoute({ access: BENCH_ROLES, body: dyeCreateJsonSchema }, async ({ body, user }) => {
  const dye = addDye(db(), { actorId: user.id, dye: body });
  return Response.json({ dye: dyeJson(dye) }, { status: 201 });
});
