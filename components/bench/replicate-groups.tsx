import { Card } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { OUTLIER_K, SPREAD_FLOOR_DE00, summarizeReplicates } from "@/lib/bench/replicates";
import type { Lab } from "@/lib/color/types";

type Row = {
  m: { id: string; l: number; a: number; b: number; uDeltaE00: number | null };
  condition: { id: string; acidBase: string; ph: number | null; additive: string; temperatureC: number | null };
  solvent: { name: string };
};

/**
 * The accepted replicates of a dye per condition, shown as replicates (each swatch, their number and
 * spread) rather than folded into one mean: two opposite colours averaged would show as one muddy swatch.
 * A condition whose replicates lie further than 3 × 1 ΔE00 from their mean is marked (the replicate rule,
 * lib/bench/replicates.ts; common practice).
 */
export function ReplicateGroups({ rows }: { rows: Row[] }) {
  const groups = new Map<string, { label: string; labs: Lab[] }>();
  for (const r of rows) {
    const c = r.condition;
    const label = [r.solvent.name, c.acidBase, c.ph !== null ? `pH ${c.ph}` : "", c.additive, c.temperatureC !== null ? `${c.temperatureC} °C` : ""].filter(Boolean).join(", ");
    const g = groups.get(c.id) ?? { label, labs: [] };
    g.labs.push([r.m.l, r.m.a, r.m.b]);
    groups.set(c.id, g);
  }
  const list = [...groups.entries()].map(([id, g]) => ({ id, ...g, summary: summarizeReplicates(g.labs)! })).sort((x, y) => x.label.localeCompare(y.label));
  const limit = OUTLIER_K * SPREAD_FLOOR_DE00;
  const disagreeing = list.filter((g) => g.summary.maxDeltaE00 > limit).length;
  return (
    <Card title={`Replicates per condition (${list.length} conditions)`} className="lg:col-span-3">
      <p className="mb-2 text-xs text-ink-soft">
        Every accepted colour is shown; n is the number of replicates, s the sample standard deviation of their ΔE00 from the mean. ⚠ marks a condition where a replicate lies more
        than {limit} ΔE00 from the mean (common practice, no source).{disagreeing ? ` ${disagreeing} condition${disagreeing === 1 ? " has" : "s have"} replicates that disagree.` : ""} Swatches are screen
        approximations.
      </p>
      {list.length === 0 ? (
        <p className="text-sm text-ink-soft">No accepted colours yet.</p>
      ) : (
        <ul className="grid gap-x-6 gap-y-1 text-sm md:grid-cols-2" data-testid="replicate-groups">
          {list.map((g) => {
            const far = g.summary.maxDeltaE00 > limit;
            return (
              <li key={g.id} className="flex flex-wrap items-center gap-2 border-b border-line py-1" data-disagrees={far ? "true" : "false"}>
                <span className="min-w-0 flex-1">
                  {far && <span className="font-semibold text-warn">⚠ </span>}
                  {g.label}
                </span>
                <span className="flex flex-wrap gap-0.5">
                  {g.labs.slice(0, 12).map((lab, i) => (
                    <Swatch key={i} lab={lab} size="sm" label={`${g.label}, replicate ${i + 1}`} />
                  ))}
                  {g.labs.length > 12 && <span className="text-xs text-ink-soft">+{g.labs.length - 12}</span>}
                </span>
                <span className="w-32 text-right text-xs tabular-nums text-ink-soft">
                  n = {g.summary.n}
                  {g.summary.n > 1 ? `, s = ${g.summary.spreadDeltaE00.toFixed(1)} ΔE00` : ""}
                </span>
              </li>
            );
          })}
        </ul>
      )}
    </Card>
  );
}
