/**
 * What a lighting profile's state means at a given moment. The stored state is draft | approved |
 * retired; an approved profile outside its validity window is shown as "expired" (or "not yet valid")
 * and, like a draft or retired one, cannot be chosen on the bench. Pure.
 */
export type ProfileStatus = "draft" | "approved" | "expired" | "not-yet-valid" | "retired";

export const STATUS_LABELS: Record<ProfileStatus, string> = {
  draft: "Draft",
  approved: "Approved",
  expired: "Expired",
  "not-yet-valid": "Not yet valid",
  retired: "Retired",
};

export function profileStatus(p: { state: string; validFrom: Date; validUntil: Date | null }, now: Date = new Date()): ProfileStatus {
  if (p.state === "retired") return "retired";
  if (p.state !== "approved") return "draft";
  if (p.validUntil && p.validUntil.getTime() < now.getTime()) return "expired";
  if (p.validFrom.getTime() > now.getTime()) return "not-yet-valid";
  return "approved";
}

/** The sentence given when a profile cannot be used on the bench, or null when it can. */
export function benchRefusal(p: { name: string; state: string; validFrom: Date; validUntil: Date | null }, now: Date = new Date()): string | null {
  switch (profileStatus(p, now)) {
    case "approved":
      return null;
    case "draft":
      return `The lighting profile “${p.name}” is a draft and not approved yet; pick an approved profile, or ask an admin to approve it.`;
    case "retired":
      return `The lighting profile “${p.name}” is retired; pick a current profile from the list.`;
    case "expired":
      return `The lighting profile “${p.name}” expired on ${p.validUntil!.toISOString().slice(0, 10)}; pick a current profile, or ask an admin to fit a new one.`;
    case "not-yet-valid":
      return `The lighting profile “${p.name}” is valid only from ${p.validFrom.toISOString().slice(0, 10)}; pick a current profile.`;
  }
}
