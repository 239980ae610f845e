/** EXIF facts kept with a photo (a subset; the original file keeps all of it). */
export type { PhotoExif as ExifSummaryFacts } from "@/lib/color/exif";
