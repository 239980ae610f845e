import { db } from "@/db/client";
import { storePhoto } from "@/db/queries/photos";
import { listRecentPhotos } from "@/db/queries/bench";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE, BENCH_ROLES } from "@/lib/auth/roles";
import { AppError, isAppError } from "@/lib/errors";
import { readLimited } from "@/lib/net/limited-body";
import { objectStore } from "@/lib/storage";
import { photoLimits } from "@/lib/storage/limits";
import { z } from "zod";
import { photoJson } from "./serialize";

// Room for the multipart envelope around the file itself.
const MULTIPART_OVERHEAD = 64 * 1024;

/** Upload one rack photo: multipart field `file`, optional `lightingProfileId`. */
export const POST = apiRoute({ access: BENCH_ROLES }, async ({ req, user }) => {
  const limits = photoLimits();
  const tooBig = `The upload is too large: photos up to ${(limits.maxBytes / 1048576).toFixed(0)} MB are accepted. Export a smaller JPEG.`;
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > limits.maxBytes + MULTIPART_OVERHEAD) throw new AppError("too_large", tooBig);
  const contentType = req.headers.get("content-type") ?? "";
  if (!contentType.toLowerCase().startsWith("multipart/form-data")) {
    throw new AppError("invalid_input", "Send the photo as multipart/form-data with the file in the field 'file'.", { file: ["Missing."] });
  }
  // Counted as it streams: a chunked upload without Content-Length stops at the limit.
  const raw = await readLimited(req.body, limits.maxBytes + MULTIPART_OVERHEAD).catch((error) => {
    throw isAppError(error) ? new AppError("too_large", tooBig) : error;
  });
  let form: FormData;
  try {
    form = await new Response(raw, { headers: { "content-type": contentType } }).formData();
  } catch {
    throw new AppError("invalid_input", "The multipart body could not be read. Send the photo as multipart/form-data with the file in the field 'file'.");
  }
  const file = form.get("file");
  if (!(file instanceof File)) throw new AppError("invalid_input", "file: attach the photo in the multipart field 'file'.", { file: ["Attach a photo."] });
  const profile = form.get("lightingProfileId");
  if (profile !== null && typeof profile !== "string") throw new AppError("invalid_input", "lightingProfileId must be text.", { lightingProfileId: ["Must be text."] });
  const bytes = new Uint8Array(await file.arrayBuffer());
  const { photo, duplicate } = await storePhoto(db(), objectStore(), {
    bytes,
    originalName: file.name || "photo",
    lightingProfileId: profile?.trim() || null,
    uploaderId: user.id,
    limits,
  });
  return Response.json({ photo: photoJson(photo), duplicate }, { status: duplicate ? 200 : 201 });
});

/** Recent photos, newest first. */
export const GET = apiRoute({ access: ANY_ROLE, query: z.object({ limit: z.coerce.number().int().min(1).max(200).default(50) }) }, async ({ query }) => {
  return { photos: listRecentPhotos(db(), { limit: query.limit }).map((r) => ({ ...photoJson(r.photo), measurementCount: r.count })) };
});
