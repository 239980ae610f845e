/** EXIF facts kept with a photo (a subset; the original file keeps all of it). */
export type ExifSummaryFacts = {
  make?: string;
  model?: string;
  takenAt?: string;
  orientation?: number;
  exposureTime?: number;
  fNumber?: number;
  iso?: number;
};
