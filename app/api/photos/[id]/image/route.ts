import { z } from "zod";
import { db } from "@/db/client";
import { getPhoto, photoDerivative, readPhotoBytes } from "@/db/queries/photos";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { objectStore } from "@/lib/storage";
import { photoLimits } from "@/lib/storage/limits";

/**
 * A photo's bytes. The thumbnail and display copies are re-encoded JPEGs; the original is sent as a
 * download with its allow-listed type, no sniffing and a sandboxing policy, so a crafted file can never
 * run as a page on our origin.
 */
export const GET = apiRoute(
  { access: ANY_ROLE, query: z.object({ size: z.enum(["thumb", "display", "original"]).default("display") }) },
  async ({ query, params }: { query: { size: "thumb" | "display" | "original" }; params: { id: string } }) => {
    const handle = db();
    const photo = getPhoto(handle, params.id);
    if (!photo) throw new AppError("not_found", "No photo has that id.");
    const store = objectStore();
    const headers: Record<string, string> = {
      "x-content-type-options": "nosniff",
      "content-security-policy": "default-src 'none'; sandbox",
      "cache-control": "private, max-age=31536000, immutable",
    };
    if (query.size === "original") {
      const bytes = await readPhotoBytes(store, photo);
      const safeName = photo.originalName.replace(/[^A-Za-z0-9._-]+/g, "_") || "photo";
      return new Response(new Uint8Array(bytes), { headers: { ...headers, "content-type": photo.mimeType, "content-disposition": `attachment; filename="${safeName}"` } });
    }
    const bytes = await photoDerivative(handle, store, photo, query.size, photoLimits());
    return new Response(new Uint8Array(bytes), { headers: { ...headers, "content-type": "image/jpeg" } });
  },
);
