import { db } from "@/db/client";
import { getPhoto, measureOnPhoto } from "@/db/queries/photos";
import { apiRoute } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { checkStandardRefusal } from "@/lib/bench/checks";
import { measureRequestSchema } from "@/lib/bench/schemas";
import { AppError } from "@/lib/errors";
import { objectStore } from "@/lib/storage";
import { photoLimits } from "@/lib/storage/limits";

/**
 * Live colours while marking: measures the given regions on the stored photo with the chosen profile
 * and references, and stores nothing. Each vial and check standard answers with its colour or the
 * reason it has none; a check standard with no light correction chosen yet answers what to do first.
 */
export const POST = apiRoute({ access: BENCH_ROLES, body: measureRequestSchema }, async ({ body, params }: { body: ReturnType<typeof measureRequestSchema.parse>; params: { id: string } }) => {
  const handle = db();
  const photo = getPhoto(handle, params.id);
  if (!photo) throw new AppError("not_found", "No photo has that id.");
  const refusal = checkStandardRefusal({ lightingProfileId: body.lightingProfileId, referenceCount: body.references.length });
  // Check standards are measured exactly like vials, through the same correction, when there is one.
  const checks = refusal ? [] : body.checks;
  const result = await measureOnPhoto(handle, objectStore(), photo, {
    lightingProfileId: body.lightingProfileId,
    references: body.references,
    vials: [...body.vials.map((v) => v.region), ...checks.map((c) => c.region)],
    maxPixels: photoLimits().maxPixels,
  });
  const checkResults = result.vials.slice(body.vials.length);
  return {
    correction: result.stored,
    photoFlags: result.photoFlags,
    references: result.references,
    vials: result.vials.slice(0, body.vials.length).map((v, i) => ({ key: body.vials[i].key, ...v })),
    checks: refusal ? body.checks.map((c) => ({ key: c.key, ok: false as const, code: "needs-correction", error: refusal })) : checkResults.map((v, i) => ({ key: checks[i].key, ...v })),
  };
});
