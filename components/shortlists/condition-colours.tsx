import { Swatch } from "@/components/ui/swatch";
import { conditionName, type ConditionSummary } from "@/lib/search/shortlist-csv";
import { count } from "@/lib/text/count";

/**
 * A dye's colour in each condition it was accepted in: the mean of its replicates as a swatch with its
 * CIELAB numbers, the replicate count and their ΔE00 spread. The same summaries the CSV export writes.
 */
/** The reference white and observer of nearly every stored colour; a tile names any other. */
export const USUAL_WHITE = "D65, CIE 1931 2°";

export function ConditionColours({ colours }: { colours: ConditionSummary[] }) {
  if (colours.length === 0) return <p className="text-xs text-ink-soft">No accepted colours yet.</p>;
  return (
    <ul className="grid gap-2 sm:grid-cols-2 xl:grid-cols-3" aria-label="Colour per condition">
      {colours.map((c) => {
        const name = conditionName(c);
        // Keep a unit on the line of its number ("23 °C", not "23" then "°C").
        const shown = name.replace(/ (°C)/g, "\u00a0$1");
        const d65 = c.whitePoint.startsWith("D65");
        const usual = c.whitePoint === USUAL_WHITE;
        return (
          <li key={c.conditionId + c.whitePoint} className="flex min-w-0 items-start gap-2 border border-line p-2" data-testid="shortlist-colour">
            {d65 ? (
              <Swatch lab={c.mean} label={name} />
            ) : (
              <span className="flex h-10 w-10 shrink-0 items-center justify-center border border-dashed border-line text-center text-[10px] leading-tight text-ink-soft">no swatch</span>
            )}
            <div className="min-w-0 text-xs">
              <p className="text-sm font-medium text-ink">{shown}</p>
              <p className="tabular-nums">
                L* {c.mean[0].toFixed(1)} · a* {c.mean[1].toFixed(1)} · b* {c.mean[2].toFixed(1)}
                {!usual && <span className="text-ink-soft"> ({c.whitePoint})</span>}
              </p>
              <p className="tabular-nums text-ink-soft">
                {count(c.n, "replicate")}
                {c.spreadDeltaE00 !== null && <> · spread ± {c.spreadDeltaE00.toFixed(1)} ΔE00</>}
              </p>
            </div>
          </li>
        );
      })}
    </ul>
  );
}
