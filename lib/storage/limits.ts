import { env } from "@/lib/config/env";
import type { PhotoLimits } from "./photo-intake";

/** The upload limits in force (MAX_UPLOAD_MB, MAX_PHOTO_MEGAPIXELS). */
export function photoLimits(): PhotoLimits {
  return { maxBytes: Math.round(env().MAX_UPLOAD_MB * 1048576), maxPixels: Math.round(env().MAX_PHOTO_MEGAPIXELS * 1e6) };
}
