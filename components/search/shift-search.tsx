"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { Button } from "@/components/ui/button";
import { Badge, Card } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import type { Lab } from "@/lib/color/types";
import { describeCondition, fetchJson, type Condition } from "./api";
import { SearchFailed, Searching } from "./query-feedback";
import { MediumSelect } from "@/components/search/medium-select";

type Side = { lab: Lab; measurementId: string; condition: Condition };
type Check = { kind: "protan" | "deutan" | "tritan"; deltaE00: number; passes: boolean };
type Dye = { id: string; code: string; name: string };
type Answer = {
  results: { dye: Dye; shift: number; shiftDeltaEOK: number; fromDeltaE00: number | null; toDeltaE00: number | null; a: Side; b: Side; viewers: Check[]; predicted: boolean }[];
  failures: { dye: Dye; reason: string; shift: number | null; viewers: Check[] }[];
};

const KEYS = ["aMedium", "aAcidBase", "bMedium", "bAcidBase", "from", "to", "minShift", "sameSolvent", "viewers", "viewerMinShift", "limit"] as const;
/** What each query parameter is called on this page, for the server's messages. */
const SCREEN_LABELS: Record<string, string> = {
  from: "Colour in A",
  to: "Colour in B",
  minShift: "Minimum shift (ΔE00)",
  viewerMinShift: "The colour-vision threshold (ΔE00)",
  viewers: "Must stay visible to",
  sameSolvent: "Pair colours in the same solvent",
  aMedium: "Medium of A",
  bMedium: "Medium of B",
  aAcidBase: "Acid / base of A",
  bAcidBase: "Acid / base of B",
};

const PRESETS = [
  { label: "Protic → aprotic", q: "aMedium=protic&bMedium=aprotic" },
  { label: "Acid → base, same solvent", q: "aAcidBase=acid&bAcidBase=base&sameSolvent=true" },
  { label: "Acid → base, visible to colour-blind viewers", q: "aAcidBase=acid&bAcidBase=base&sameSolvent=true&minShift=20&viewers=protan,deutan,tritan&viewerMinShift=10" },
];

function ConditionPicker({ prefix, params }: { prefix: "a" | "b"; params: URLSearchParams }) {
  return (
    <>
      <MediumSelect name={`${prefix}Medium`} defaultValue={params.get(`${prefix}Medium`)} />
      <label className="text-sm font-medium">
        Acid / base
        <select name={`${prefix}AcidBase`} defaultValue={params.get(`${prefix}AcidBase`) ?? "any"} className="mt-1 min-h-11 w-full rounded-md border border-field bg-white px-3 font-normal">
          <option value="any">any</option>
          <option value="acid">acid</option>
          <option value="neutral">neutral</option>
          <option value="base">base</option>
        </select>
      </label>
    </>
  );
}

export function ShiftSearch() {
  const params = useSearchParams();
  const router = useRouter();
  const pathname = usePathname();
  const qs = new URLSearchParams([...params.entries()].filter(([k, v]) => v !== "" && (KEYS as readonly string[]).includes(k))).toString();
  const asked = params.has("aMedium") || params.has("aAcidBase") || params.has("bMedium") || params.has("bAcidBase") || params.has("run");
  const search = useQuery({
    queryKey: ["shift-search", qs],
    queryFn: ({ signal }) => fetchJson<Answer>(`/api/search/shift?${qs}`, signal),
    enabled: asked,
    placeholderData: keepPreviousData,
  });
  const viewers = new Set((params.get("viewers") ?? "").split(",").filter(Boolean));

  function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const next = new URLSearchParams({ run: "1" });
    for (const key of KEYS) {
      if (key === "viewers") continue;
      const v = String(form.get(key) ?? "").trim();
      if (v && v !== "any") next.set(key, v);
    }
    const kinds = form.getAll("viewer").map(String);
    if (kinds.length) next.set("viewers", kinds.join(","));
    router.push(`${pathname}?${next.toString()}`);
  }
  const answer = search.data;

  return (
    <>
      <div className="mb-3 flex flex-wrap gap-2 text-sm">
        <span className="py-1 text-ink-soft">Common questions:</span>
        {PRESETS.map((p) => (
          <Link key={p.label} href={`${pathname}?run=1&${p.q}`} className="rounded-full border border-line bg-white px-3 py-1 hover:bg-paper-deep">
            {p.label}
          </Link>
        ))}
      </div>
      <Card>
        <form key={qs} onSubmit={submit} aria-label="Search by colour shift" className="space-y-4">
          <div className="grid gap-4 md:grid-cols-2">
            <fieldset className="grid grid-cols-2 gap-3 rounded-md border border-field p-3">
              <legend className="px-1 text-sm font-semibold">Condition A</legend>
              <ConditionPicker prefix="a" params={params} />
              <label className="col-span-2 text-sm font-medium">
                Colour in A (optional: word, hex or L,a,b)
                <input name="from" defaultValue={params.get("from") ?? ""} placeholder="e.g. violet" className="mt-1 min-h-11 w-full rounded-md border border-field px-3 font-normal" />
              </label>
            </fieldset>
            <fieldset className="grid grid-cols-2 gap-3 rounded-md border border-field p-3">
              <legend className="px-1 text-sm font-semibold">Condition B</legend>
              <ConditionPicker prefix="b" params={params} />
              <label className="col-span-2 text-sm font-medium">
                Colour in B (optional)
                <input name="to" defaultValue={params.get("to") ?? ""} placeholder="e.g. yellow" className="mt-1 min-h-11 w-full rounded-md border border-field px-3 font-normal" />
              </label>
            </fieldset>
          </div>
          <div className="flex flex-wrap items-end gap-4">
            <label className="text-sm font-medium">
              Minimum shift (ΔE00)
              <input name="minShift" inputMode="decimal" defaultValue={params.get("minShift") ?? ""} placeholder="0" className="mt-1 min-h-11 w-28 rounded-md border border-field px-3 font-normal" />
            </label>
            <label className="flex min-h-11 items-center gap-2 text-sm">
              <input type="checkbox" name="sameSolvent" value="true" defaultChecked={params.get("sameSolvent") === "true"} className="h-5 w-5" />
              pair colours in the same solvent
            </label>
            <fieldset className="flex flex-wrap items-center gap-3 text-sm">
              <legend className="sr-only">Colour-vision check</legend>
              <span className="font-medium">Must stay visible to:</span>
              {(["protan", "deutan", "tritan"] as const).map((k) => (
                <label key={k} className="flex items-center gap-1">
                  <input type="checkbox" name="viewer" value={k} defaultChecked={viewers.has(k)} className="h-5 w-5" />
                  {k}
                </label>
              ))}
              <label className="flex items-center gap-1">
                with ΔE00 ≥
                <input name="viewerMinShift" inputMode="decimal" defaultValue={params.get("viewerMinShift") ?? "10"} className="min-h-11 w-20 rounded-md border border-field px-3" />
              </label>
            </fieldset>
            <Button type="submit">Search</Button>
            <Searching active={search.isFetching} />
          </div>
        </form>
      </Card>
      <SearchFailed error={search.isError ? search.error : null} labels={SCREEN_LABELS} />
      {asked && answer && (
        <>
          <Card className="mt-4" title={`${answer.results.length} ${answer.results.length === 1 ? "dye" : "dyes"} with a fitting shift between A and B`}>
            {answer.results.length === 0 ? (
              <p className="text-sm text-ink-soft">No dye passes. Lower the minimum shift or the viewer threshold, or widen a condition; the reasons are listed below.</p>
            ) : (
              <>
              <p className="text-sm text-ink-soft">
                Large shifts are ranked by ΔEOK, the distance in OKLab ×100 (Ottosson 2020), which stays continuous for large colour
                changes; ΔE00 (CIEDE2000, made for small differences) is shown beside it.
              </p>
              <ol className="divide-y divide-line" aria-label="Shift results">
                {answer.results.map((r, i) => (
                  <li key={r.dye.id} className="flex flex-wrap items-center gap-3 py-2 text-sm" data-testid="shift-hit">
                    <span className="w-6 text-right text-ink-soft">{i + 1}</span>
                    <span className="flex items-center gap-1">
                      <Swatch lab={r.a.lab} label={`A: ${r.a.condition.solvent}`} />
                      <span aria-hidden>→</span>
                      <Swatch lab={r.b.lab} label={`B: ${r.b.condition.solvent}`} />
                    </span>
                    <div className="min-w-0 flex-1 basis-56">
                      <Link href={`/catalogue/${encodeURIComponent(r.dye.code)}`} className="font-semibold text-accent hover:underline">
                        {r.dye.code} · {r.dye.name}
                      </Link>
                      <p className="text-ink-soft">
                        A: {describeCondition(r.a.condition)} → B: {describeCondition(r.b.condition)}
                      </p>
                      {r.viewers.length > 0 && <p className="text-ink-soft">{r.viewers.map((v) => `${v.kind} ΔE00 ${v.deltaE00.toFixed(1)}`).join(" · ")}</p>}
                    </div>
                    <Badge tone="ok">measured</Badge>
                    {r.fromDeltaE00 !== null && <span className="tabular-nums text-ink-soft">ΔE00 to the A colour {r.fromDeltaE00.toFixed(1)}</span>}
                    {r.toDeltaE00 !== null && <span className="tabular-nums text-ink-soft">ΔE00 to the B colour {r.toDeltaE00.toFixed(1)}</span>}
                    <span className="text-right tabular-nums">
                      <span className="font-semibold">shift A→B: ΔEOK {r.shiftDeltaEOK.toFixed(1)}</span>
                      <span className="block text-ink-soft">ΔE00 {r.shift.toFixed(1)}</span>
                    </span>
                  </li>
                ))}
              </ol>
              </>
            )}
          </Card>
          {answer.failures.length > 0 && (
            <Card className="mt-4" title={`${answer.failures.length} ${answer.failures.length === 1 ? "dye" : "dyes"} left out, and why`}>
              <ul className="divide-y divide-line text-sm" aria-label="Dyes left out">
                {answer.failures.map((f) => (
                  <li key={f.dye.id} className="py-2" data-testid="shift-failure">
                    <span className="font-semibold">{f.dye.code}</span> · {f.dye.name}: <span className="text-ink-soft">{f.reason}</span>
                  </li>
                ))}
              </ul>
            </Card>
          )}
          <p className="mt-3 text-xs text-ink-soft">
            Colour-vision checks simulate dichromat viewers (Machado, Oliveira &amp; Fernandes 2009) on the screen approximation of each colour; confirm with real observers before relying on them.
          </p>
        </>
      )}
    </>
  );
}
