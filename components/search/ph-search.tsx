"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useState } from "react";
import { seText } from "@/components/acid-base/format";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import type { Lab } from "@/lib/color/types";
import { PH_RANGE_RULE } from "@/lib/search/ph-range";
import { count } from "@/lib/text/count";
import { describeCondition, fetchJson, type Condition } from "./api";
import { SearchFailed, Searching } from "./query-feedback";
import { MediumSelect } from "@/components/search/medium-select";

type Transition = { series: { name: string; medium: string; ionicStrengthMolL: number | null }; pKa: number; pKaStdErr: number | null; transition: [number, number]; thresholdDeltaE00: number; acidLab: Lab; baseLab: Lab; flags: string[]; centreOffset: number };
type Hit = { dye: { id: string; code: string; name: string }; phTransition: Transition; deltaE00?: number; lab?: Lab; condition?: Condition };
type Answer = { target: { lab: Lab } | null; phRange: { from: number; to: number; rule: string }; results: Hit[] };

const KEYS = ["phFrom", "phTo", "hex", "medium", "limit"] as const;
const LABELS = { phFrom: "pH from", phTo: "pH to", hex: "Target colour" };

/** "Changes colour between pH x and y": dyes whose stored pKa fit's visual transition lies in the range. */
export function PhSearch() {
  const params = useSearchParams();
  const router = useRouter();
  const pathname = usePathname();
  const qs = new URLSearchParams([...params.entries()].filter(([k, v]) => v !== "" && (KEYS as readonly string[]).includes(k))).toString();
  const ready = Boolean(params.get("phFrom") && params.get("phTo"));
  const [withTarget, setWithTarget] = useState(Boolean(params.get("hex")));
  const [hex, setHex] = useState(params.get("hex") ?? "2050c0");
  const search = useQuery({ queryKey: ["ph-search", qs], queryFn: ({ signal }) => fetchJson<Answer>(`/api/search?${qs}`, signal), enabled: ready, placeholderData: keepPreviousData });

  function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const next = new URLSearchParams();
    for (const key of ["phFrom", "phTo", "medium"] as const) {
      const v = String(form.get(key) ?? "").trim();
      if (v && v !== "any") next.set(key, v);
    }
    if (withTarget) next.set("hex", hex.replace(/^#/, ""));
    router.push(`${pathname}?${next.toString()}`);
  }

  const answer = search.data;
  return (
    <>
      <Card>
        <form key={qs} onSubmit={submit} role="search" aria-label="Search by pH transition" className="space-y-4">
          <div className="grid gap-4 sm:grid-cols-3">
            <label className="text-sm font-medium">
              Changes colour from pH
              <input name="phFrom" inputMode="decimal" defaultValue={params.get("phFrom") ?? ""} placeholder="e.g. 4" required className="mt-1 min-h-11 w-full rounded-md border border-field px-3 font-normal" />
            </label>
            <label className="text-sm font-medium">
              to pH
              <input name="phTo" inputMode="decimal" defaultValue={params.get("phTo") ?? ""} placeholder="e.g. 7" required className="mt-1 min-h-11 w-full rounded-md border border-field px-3 font-normal" />
            </label>
            <MediumSelect name="medium" label="Medium of the series" defaultValue={params.get("medium")} />
          </div>
          <div className="flex flex-wrap items-center gap-3 text-sm">
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={withTarget} onChange={(e) => setWithTarget(e.target.checked)} className="h-5 w-5" />
              Also rank by closeness to a colour
            </label>
            {withTarget && (
              <label className="flex items-center gap-2">
                <input type="color" value={`#${hex.replace(/^#/, "")}`} onChange={(e) => setHex(e.target.value.slice(1))} className="h-11 w-16 cursor-pointer rounded border border-line" aria-label="Target colour" />
                <span className="tabular-nums text-ink-soft">#{hex}</span>
              </label>
            )}
          </div>
          <p className="text-xs text-ink-soft" data-testid="ph-rule">
            {PH_RANGE_RULE} Without a colour, dyes are ordered by how close the middle of their transition is to the middle of the range; with a colour, by ΔE00 (CIEDE2000) of their
            closest accepted colour (mean of replicates) to it.
          </p>
          <div className="flex items-center gap-3">
            <Button type="submit">Search</Button>
            <Searching active={search.isFetching} />
          </div>
        </form>
      </Card>
      <SearchFailed error={search.isError ? search.error : null} labels={LABELS} />
      {ready && answer && (
        <Card className="mt-4" title={`${count(answer.results.length, "dye")} changing colour within pH ${answer.phRange.from}–${answer.phRange.to}`}>
          {answer.results.length === 0 ? (
            <p className="text-sm text-ink-soft">No stored pKa fit has its visual transition inside this range. Widen the range, or group the vials of more indicators into pH series.</p>
          ) : (
            <ol className="divide-y divide-line" aria-label="Search results">
              {answer.results.map((r, i) => {
                const t = r.phTransition;
                return (
                  <li key={r.dye.id} className="flex flex-wrap items-center gap-3 py-2 text-sm" data-testid="ph-hit">
                    <span className="w-6 text-right text-ink-soft">{i + 1}</span>
                    <span className="flex items-center gap-1">
                      <Swatch lab={t.acidLab} label="acid form" /> → <Swatch lab={t.baseLab} label="base form" />
                    </span>
                    <div className="min-w-0 flex-1 basis-48">
                      <Link href={`/catalogue/${encodeURIComponent(r.dye.code)}`} className="font-semibold">
                        {r.dye.code} · {r.dye.name}
                      </Link>
                      <p className="text-ink-soft">
                        {t.series.name} · {t.series.medium}
                        {t.series.ionicStrengthMolL !== null ? `, I = ${t.series.ionicStrengthMolL} mol/L` : ", ionic strength not recorded"}
                      </p>
                    </div>
                    <span className="w-36 tabular-nums">
                      apparent pKa {t.pKa.toFixed(2)} ± {seText(t.pKaStdErr)}
                    </span>
                    <span className="w-40 tabular-nums">
                      transition pH {t.transition[0].toFixed(1)}–{t.transition[1].toFixed(1)}
                    </span>
                    {r.deltaE00 !== undefined && r.lab && r.condition && (
                      <span className="flex items-center gap-2">
                        <Swatch lab={r.lab} size="sm" label={r.condition.solvent} />
                        <span className="tabular-nums">
                          ΔE00 {r.deltaE00.toFixed(1)}
                          <span className="block text-xs text-ink-soft">{describeCondition(r.condition)}</span>
                        </span>
                      </span>
                    )}
                  </li>
                );
              })}
            </ol>
          )}
          <p className="mt-3 text-xs text-ink-soft">
            pKa values are apparent: they hold for the series' medium and ionic strength (pH in a non-aqueous or mixed medium is not aqueous pH). ± is the bootstrap standard
            deviation. Swatches are screen approximations; decide on the numbers.
          </p>
        </Card>
      )}
    </>
  );
}
