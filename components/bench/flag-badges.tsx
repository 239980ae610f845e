import { Badge } from "@/components/ui/card";
import { flagWords } from "@/lib/bench/flags";

/**
 * A measurement's quality flags in words (lib/bench/flags.ts). `short` words suit a table cell; the
 * full sentence is then the badge's title. The stored code stays on `data-flag` for scripts and tests.
 */
export function FlagBadges({ flags, size = "long", label }: { flags: string[]; size?: "short" | "long"; label?: string }) {
  if (flags.length === 0) return null;
  return (
    <ul className="inline-flex flex-wrap gap-1" aria-label={label ?? "Quality flags"}>
      {flags.map((f) => {
        const words = flagWords(f);
        return (
          <li key={f} data-testid="flag" data-flag={f} title={size === "short" ? words.long : undefined}>
            <Badge tone="warn">{size === "short" ? words.short : words.long}</Badge>
          </li>
        );
      })}
    </ul>
  );
}
