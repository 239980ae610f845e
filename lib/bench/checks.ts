/**
 * When a check standard can be read on a bench photo. Its ΔE00 to the known value says how well the
 * photo's light is corrected; with no correction at all (no lighting profile and no in-photo reference)
 * it would only say how far the bare camera is off, so the bench neither shows nor records it.
 */
export const CHECK_NEEDS_CORRECTION =
  "No light correction yet: choose a lighting profile or mark a white or grey reference of known CIELAB first; a check standard read without one says nothing about the light.";

/** The sentence telling the chemist what to do before a check standard can be read, or null when it can be. */
export function checkStandardRefusal({ lightingProfileId, referenceCount }: { lightingProfileId: string | null; referenceCount: number }): string | null {
  return lightingProfileId || referenceCount > 0 ? null : CHECK_NEEDS_CORRECTION;
}
