import { db } from "@/db/client";
import { listPhotosPage, storePhoto, type PhotoCursor } from "@/db/queries/photos";
import { apiRoute } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
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

const CURSOR_HELP = "cursor: use the nextCursor value of the previous page unchanged, or leave it out for the first page.";

/** Cursors are opaque to callers: base64url of the last photo's upload time and id. */
function encodeCursor(cursor: PhotoCursor): string {
  return Buffer.from(JSON.stringify([cursor.createdAt, cursor.id])).toString("base64url");
}

function decodeCursor(text: string): PhotoCursor | null {
  try {
    const value = JSON.parse(Buffer.from(text, "base64url").toString("utf8"));
    if (Array.isArray(value) && value.length === 2 && Number.isSafeInteger(value[0]) && typeof value[1] === "string" && value[1].length <= 100) return { createdAt: value[0], id: value[1] };
  } catch {
    /* refused below */
  }
  return null;
}

const listQuery = z.object({
  limit: z.coerce.number({ error: "limit must be a whole number from 1 to 200" }).int("limit must be a whole number from 1 to 200").min(1, "limit must be a whole number from 1 to 200").max(200, "limit must be a whole number from 1 to 200").default(50),
  cursor: z.string().max(400, CURSOR_HELP).optional(),
});

/** GET /api/photos?limit=&cursor=: photos newest first, one page at a time; chemists and admins. */
export const GET = apiRoute({ access: BENCH_ROLES, query: listQuery }, async ({ query }) => {
  const after = query.cursor ? decodeCursor(query.cursor) : null;
  if (query.cursor && !after) throw new AppError("invalid_input", CURSOR_HELP, { cursor: ["Not a cursor from this API."] });
  const { rows, next } = listPhotosPage(db(), { limit: query.limit, after });
  return {
    photos: rows.map(({ photo, profile }) => ({ ...photoJson(photo), size: photo.byteSize, created: photo.createdAt.toISOString(), profile })),
    nextCursor: next ? encodeCursor(next) : null,
  };
});
