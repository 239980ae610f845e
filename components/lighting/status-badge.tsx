import { Badge } from "@/components/ui/card";
import { STATUS_LABELS, type ProfileStatus } from "@/lib/lighting/status";

const TONE: Record<ProfileStatus, "ok" | "warn" | "bad" | "neutral"> = { approved: "ok", draft: "neutral", expired: "bad", "not-yet-valid": "warn", retired: "bad" };
/** A mark beside the word, so the state is not told by colour alone. */
const MARK: Record<ProfileStatus, string> = { approved: "✓", draft: "✎", expired: "◷", "not-yet-valid": "…", retired: "✕" };

export function ProfileStatusBadge({ status }: { status: ProfileStatus }) {
  return (
    <span data-testid="profile-status" data-status={status}>
      <Badge tone={TONE[status]}>
        <span aria-hidden="true" className="mr-1">{MARK[status]}</span>
        {STATUS_LABELS[status]}
      </Badge>
    </span>
  );
}
