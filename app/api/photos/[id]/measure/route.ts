import { db } from "@/db/client";
import { getPhoto, measureOnPhoto } from "@/db/queries/photos";
import { apiRoute } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { measureRequestSchema } from "@/lib/bench/schemas";
import { AppError } from "@/lib/errors";
import { objectStore } from "@/lib/storage";
import { photoLimits } from "@/lib/storage/limits";

/**
 * Live colours while marking: measures the given regions on the stored photo with the chosen profile
 * and references, and stores nothing. Each vial answers with its colour or the reason it has none.
 */
export const POST = apiRoute({ access: BENCH_ROLES, body: measureRequestSchema }, async ({ body, params }: { body: ReturnType<typeof measureRequestSchema.parse>; params: { id: string } }) => {
  const handle = db();
  const photo = getPhoto(handle, params.id);
  if (!photo) throw new AppError("not_found", "No photo has that id.");
  const result = await measureOnPhoto(handle, objectStore(), photo, {
    lightingProfileId: body.lightingProfileId,
    references: body.references,
    vials: body.vials.map((v) => v.region),
    maxPixels: photoLimits().maxPixels,
  });
  return {
    correction: result.stored,
    photoFlags: result.photoFlags,
    references: result.references,
    vials: result.vials.map((v, i) => ({ key: body.vials[i].key, ...v })),
  };
});
