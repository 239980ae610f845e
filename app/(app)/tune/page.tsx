import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { findDyeByCode, listDyes } from "@/db/queries/dyes";
import { tuneInputs } from "@/db/queries/models";
import { PredictedSwatch } from "@/components/models/predicted-swatch";
import { Button } from "@/components/ui/button";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { labD65ToHex } from "@/lib/color/display";
import { tune } from "@/lib/models/tune";
import { tuneQuerySchema } from "@/lib/models/tune-query";

export const metadata: Metadata = { title: "Tune a colour" };

/**
 * Tune: a target colour and a dye (or every dye) → the table's neat solvents and binary blends ranked by
 * predicted ΔE00 to the target, with uncertainty, what each figure rests on, and each solvent's cautions.
 */
/** Above this ΔE00 the best result is told as "nothing close", not offered as an answer (common practice, no source). */
const FAR_DELTA_E00 = 10;

export default async function TunePage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  await pageAccess(ANY_ROLE);
  const handle = db();
  const parsed = tuneQuerySchema.safeParse(await searchParams);
  const dyes = listDyes(handle).filter((d) => d.acceptedCount > 0);
  const query = parsed.success ? parsed.data : null;
  const dye = query?.dyeCode ? findDyeByCode(handle, { code: query.dyeCode }) : undefined;
  const unknownDye = query?.dyeCode && !dye;
  // Across dyes the stored models are used as they are (kept up to date beside the server and on each dye
  // page), so the page never waits for every model to be recomputed.
  const inputs = query?.target && !unknownDye ? tuneInputs(handle, { dyeId: dye?.id, storedOnly: !dye }) : [];
  const missing = query?.target && !dye ? dyes.length - inputs.length : 0;
  const results = query?.target && !unknownDye ? tune(query.target, inputs, { limit: 25, blends: query.blends, perDye: dye ? Infinity : 3 }) : [];
  const cautionSolvents = [...new Map(results.flatMap((r) => r.solvents).map((s) => [s.solvent, { name: s.solvent, cautions: s.cautions }])).values()];

  return (
    <>
      <PageHeader
        title="Tune a colour"
        lead="Give a target colour and a dye, or every dye: Solvatlas ranks neat solvents and two-solvent blends by the colour its solvent models predict, closest first, each with its uncertainty."
      />
      <div className="grid gap-4 lg:grid-cols-3">
        <Card title="Target and dye" className="lg:col-span-1">
          <form method="get" action="/tune" className="space-y-3 text-sm" aria-label="Tune">
            <label className="block">
              <span className="font-medium">Dye</span>
              <select name="dye" defaultValue={query?.dyeCode ?? "all"} className="mt-1 block w-full rounded-md border border-line bg-white px-2 py-2">
                <option value="all">Every dye (which dye, in which solvent or blend)</option>
                {dyes.map((d) => (
                  <option key={d.id} value={d.code}>
                    {d.code} — {d.name}
                  </option>
                ))}
              </select>
            </label>
            <label className="block">
              <span className="font-medium">Target colour</span>
              <input
                name="target"
                defaultValue={query?.text ?? ""}
                placeholder="7a3fa0, 40,45,-50 or violet"
                className="mt-1 block w-full rounded-md border border-line px-2 py-2"
                aria-describedby="target-hint"
              />
              <span id="target-hint" className="mt-1 block text-xs text-ink-soft">
                A hex colour, L*,a*,b* (CIELAB D65) or a colour word; or pick one below.
              </span>
            </label>
            <label className="flex items-center gap-2">
              <span className="font-medium">Or pick</span>
              <input type="color" name="picker" defaultValue={query?.target ? labD65ToHex(query.target) : "#7a3fa0"} className="h-9 w-14 rounded border border-line" />
            </label>
            <label className="flex items-center gap-2">
              <input type="checkbox" name="blends" value="off" defaultChecked={query ? !query.blends : false} />
              <span>Neat solvents only (no blends)</span>
            </label>
            <Button type="submit">Rank solvents and blends</Button>
          </form>
          {!parsed.success && (
            <div className="mt-3">
              <Notice tone="error">{parsed.error.issues[0]?.message}</Notice>
            </div>
          )}
          {unknownDye && (
            <div className="mt-3">
              <Notice tone="error">No dye has the code {query!.dyeCode}; choose one from the list.</Notice>
            </div>
          )}
        </Card>
        <Card title={query?.target ? `Closest predicted colours${query.word ? ` to “${query.word}”` : ""}` : "Results"} className="lg:col-span-2">
          {!query?.target ? (
            <p className="text-sm text-ink-soft">Give a target colour to see the ranking.</p>
          ) : results.length === 0 ? (
            <p className="text-sm text-ink-soft">No dye has a solvent model or measured colours to rank yet.</p>
          ) : (
            <>
              <div className="mb-3 flex items-center gap-3 text-sm">
                <Swatch lab={query.target} size="md" label="target" />
                <span>
                  Target L* {query.target[0].toFixed(1)}, a* {query.target[1].toFixed(1)}, b* {query.target[2].toFixed(1)} (CIELAB D65)
                </span>
              </div>
              {results[0].deltaE00 > FAR_DELTA_E00 && (
                <div className="mb-3">
                  <Notice tone="caution" title="Nothing here comes close to the target">
                    The nearest colour is ΔE00 {results[0].deltaE00.toFixed(1)} from it, far more than a visible difference (more than {FAR_DELTA_E00} ΔE00; common practice, no source).
                    {dye ? " Try every dye, or another dye." : " No dye with a solvent model reaches this colour in the table's solvents or their blends."}
                  </Notice>
                </div>
              )}
              <div className="overflow-x-auto">
                <table className="w-full min-w-[40rem] text-left text-sm" aria-label="Ranked solvents and blends">
                  <thead className="text-xs text-ink-soft">
                    <tr>
                      <th className="py-1 pr-2">#</th>
                      <th className="py-1 pr-2">Colour</th>
                      <th className="py-1 pr-2">Dye</th>
                      <th className="py-1 pr-2">Solvent or blend</th>
                      <th className="py-1 pr-2 text-right">ΔE00 to target</th>
                      <th className="py-1 pr-2 text-right">± ΔE00</th>
                      <th className="py-1 pr-2">Based on</th>
                    </tr>
                  </thead>
                  <tbody className="divide-y divide-line">
                    {results.map((r, i) => (
                      <tr key={`${r.dye.id}-${r.solvents.map((s) => s.solventId).join("-")}-${r.x2}`} data-kind={r.kind}>
                        <td className="py-1.5 pr-2 tabular-nums">{i + 1}</td>
                        <td className="py-1.5 pr-2">{r.measured ? <Swatch lab={r.lab} size="md" label="measured" /> : <PredictedSwatch lab={r.lab} uncertaintyDeltaE00={r.uncertaintyDeltaE00} size="md" />}</td>
                        <td className="py-1.5 pr-2">
                          <Link href={`/catalogue/${encodeURIComponent(r.dye.code)}`} className="underline">
                            {r.dye.code}
                          </Link>
                          <span className="block text-xs text-ink-soft">{r.dye.name}</span>
                        </td>
                        <td className="py-1.5 pr-2">
                          {r.kind === "neat"
                            ? r.solvents[0].solvent
                            : `${r.solvents[0].solvent} + ${r.solvents[1].solvent}, x₂ = ${r.x2!.toFixed(1)} (mole fraction of ${r.solvents[1].solvent})`}
                        </td>
                        <td className="py-1.5 pr-2 text-right tabular-nums">{r.deltaE00.toFixed(1)}</td>
                        <td className="py-1.5 pr-2 text-right tabular-nums">{r.measured ? "measured" : `± ${r.uncertaintyDeltaE00.toFixed(1)}`}</td>
                        <td className="py-1.5 pr-2 text-xs">
                          {r.measured ? "measured (mean of accepted replicates)" : `predicted: ${r.basis}`}
                          {r.extrapolated && <span className="block font-medium text-warn">extrapolated beyond the measured solvents</span>}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
              {missing > 0 && (
                <p className="mt-2 text-xs text-ink-soft">
                  {missing} {missing === 1 ? "dye has" : "dyes have"} no stored solvent model yet and {missing === 1 ? "is" : "are"} not ranked; opening a dye’s page computes its model.
                </p>
              )}
              <p className="mt-2 text-xs text-ink-soft">
                Predictions come from each dye’s solvent model (see its page); blends assume ideal mixing of the band position (ν̃) unless the pair was measured in three or more compositions, and
                carry a wider uncertainty for that approximation. A model fitted on few solvents is a guide, not a guarantee: confirm the colour at the bench.
              </p>
            </>
          )}
        </Card>
        {cautionSolvents.length > 0 && (
          <div className="lg:col-span-3">
            <SafetyNotice solvents={cautionSolvents} />
          </div>
        )}
      </div>
    </>
  );
}
