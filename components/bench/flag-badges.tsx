import { Badge } from "@/components/ui/card";
import { flagWords } from "@/lib/bench/flags";

/**
 * A measurement's quality flags in words (lib/bench/flags.ts). `short` words suit a table cell; the
 * full sentence is then the badge's title. The stored code stays on `data-flag` for scripts and tests.
 * Phrasing content only (spans with list roles), so it may sit inside a paragraph: a <ul> in a <p> is
 * closed early by the HTML parser and breaks hydration.
 */
export function FlagBadges({ flags, size = "long", label }: { flags: string[]; size?: "short" | "long"; label?: string }) {
  if (flags.length === 0) return null;
  return (
    <span role="list" className="inline-flex flex-wrap gap-1" aria-label={label ?? "Quality flags"}>
      {flags.map((f) => {
        const words = flagWords(f);
        return (
          <span role="listitem" key={f} data-testid="flag" data-flag={f} title={size === "short" ? words.long : undefined} className={size === "short" ? "whitespace-nowrap" : undefined}>
            <Badge tone="warn">{size === "short" ? words.short : words.long}</Badge>
          </span>
        );
      })}
    </span>
  );
}
