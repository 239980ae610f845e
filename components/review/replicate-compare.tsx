import { Swatch } from "@/components/ui/swatch";
import { checkReplicate, LIGHTNESS_FLAG, MAX_LIGHTNESS } from "@/lib/bench/replicates";
import type { Lab } from "@/lib/color/types";

/**
 * A measurement beside the earlier accepted colours of the same dye and condition, with the verdict of
 * the replicate rule (lib/bench/replicates.ts: beyond 3 × the combined spread; common practice).
 */
export function ReplicateCompare({ lab, uncertaintyDeltaE00, earlier }: { lab: Lab; uncertaintyDeltaE00: number | null; earlier: Lab[] }) {
  const verdict = checkReplicate(lab, earlier, uncertaintyDeltaE00);
  const tooLight = lab[0] > MAX_LIGHTNESS;
  if (!verdict && !tooLight) return <p className="text-xs text-ink-soft">First accepted colour of this dye in this condition: nothing to compare with yet.</p>;
  return (
    <div className="space-y-1 text-xs" data-testid="replicate-compare" data-disagrees={verdict?.disagrees ? "true" : "false"}>
      {tooLight && (
        <p className="font-semibold text-warn" data-flag={LIGHTNESS_FLAG}>
          ⚠ L* {lab[0].toFixed(1)} is above {MAX_LIGHTNESS}: lighter than the reference white, so the light or the reference is off.
        </p>
      )}
      {verdict && (
        <>
          <p className={verdict.disagrees ? "font-semibold text-warn" : "text-ink-soft"}>
            {verdict.disagrees ? "⚠ Disagrees with" : "Agrees with"} {verdict.earlier.n} earlier accepted colour{verdict.earlier.n === 1 ? "" : "s"} of this dye and condition: ΔE00{" "}
            {verdict.deltaE00.toFixed(1)} from their mean (limit {verdict.limitDeltaE00.toFixed(1)}; their spread {verdict.earlier.spreadDeltaE00.toFixed(1)} ΔE00).
          </p>
          <div className="flex flex-wrap items-center gap-1" aria-label="Earlier accepted colours, then this one">
            {earlier.slice(-10).map((e, i) => (
              <Swatch key={i} lab={e} size="sm" label={`Earlier accepted ${i + 1}`} />
            ))}
            <span aria-hidden className="px-1 text-ink-soft">
              →
            </span>
            <Swatch lab={lab} size="sm" label="This measurement" />
          </div>
        </>
      )}
    </div>
  );
}
