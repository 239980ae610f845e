import { db } from "@/db/client";
import { changeDye, findDyeById } from "@/db/queries/dyes";
import { apiRoute, parseInput } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { dyeCreateJsonSchema, dyePatchJsonSchema } from "@/lib/validation/dye";
import { dyeJson } from "../serialize";

/**
 * Changes a dye (chemists, admins). The fields sent are merged with the stored dye and the result is
 * checked as a whole by the same rules as the catalogue form; the change goes into the audit log.
 */
export const PATCH = apiRoute({ access: BENCH_ROLES, body: dyePatchJsonSchema }, async ({ body, user, params }: { body: ReturnType<typeof dyePatchJsonSchema.parse>; user: { id: string }; params: { id: string } }) => {
  const handle = db();
  const before = findDyeById(handle, { id: params.id });
  if (!before) throw new AppError("not_found", "No dye has that id.");
  const merged = parseInput(dyeCreateJsonSchema, {
    code: before.code,
    name: before.name,
    class: before.dyeClass,
    casNumber: before.casNumber,
    molarMass: before.molarMass,
    synonyms: before.synonyms,
    notes: before.notes,
    hazards: before.hazards,
    ...Object.fromEntries(Object.entries(body).filter(([, v]) => v !== undefined)),
  });
  const after = changeDye(handle, { actorId: user.id, id: before.id, changes: merged });
  if (!after) throw new AppError("not_found", "No dye has that id.");
  return { dye: dyeJson(after) };
});
