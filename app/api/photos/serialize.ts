import type { Photo } from "@/db/schema";

/** The public JSON shape of a photo record. */
export function photoJson(photo: Photo) {
  return {
    id: photo.id,
    sha256: photo.sha256,
    originalName: photo.originalName,
    mimeType: photo.mimeType,
    byteSize: photo.byteSize,
    width: photo.width,
    height: photo.height,
    bitDepth: photo.bitDepth,
    lightingProfileId: photo.lightingProfileId,
    exif: photo.exif,
    takenAt: photo.takenAt?.toISOString() ?? null,
    uploadedAt: photo.createdAt.toISOString(),
    uploadedBy: photo.uploadedBy,
    urls: {
      thumb: `/api/photos/${photo.id}/image?size=thumb`,
      display: `/api/photos/${photo.id}/image?size=display`,
      original: `/api/photos/${photo.id}/image?size=original`,
      mark: `/bench/photos/${photo.id}`,
    },
  };
}
