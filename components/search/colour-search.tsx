"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useState } from "react";
import { Button, ButtonLink } from "@/components/ui/button";
import { Badge, Card } from "@/components/ui/card";
import { PredictedSwatch } from "@/components/models/predicted-swatch";
import { Swatch } from "@/components/ui/swatch";
import type { Lab } from "@/lib/color/types";
import { COLOUR_WORDS } from "@/lib/search/colour-words";
import { describeCondition, fetchJson, type Condition } from "./api";
import { SearchFailed, Searching } from "./query-feedback";
import { count } from "@/lib/text/count";
import { KeepHit } from "@/components/shortlists/keep-hit";
import { MediumSelect } from "@/components/search/medium-select";

type Hit = { dye: { id: string; code: string; name: string }; deltaE00: number; lab: Lab; condition: Condition; predicted: boolean; measurements: number; replicates?: number; spreadDeltaE00?: number; uncertaintyDeltaE00?: number | null; tieWithPrevious?: boolean };
type Answer = { target: { lab: Lab; word?: string }; results: Hit[] };

const TARGET_KINDS = [
  { kind: "picker", label: "Picker" },
  { kind: "hex", label: "Hex" },
  { kind: "lab", label: "CIELAB" },
  { kind: "word", label: "Colour word" },
] as const;
type TargetKind = (typeof TARGET_KINDS)[number]["kind"];

const FILTER_KEYS = ["medium", "acidBase", "solvent", "phMin", "phMax", "limit", "predicted"] as const;

export function ColourSearch({ solvents, lists = [] }: { solvents: { id: string; name: string }[]; lists?: { id: string; name: string }[] }) {
  const params = useSearchParams();
  const router = useRouter();
  const pathname = usePathname();
  const qs = new URLSearchParams([...params.entries()].filter(([k, v]) => v !== "" && ["hex", "lab", "word", ...FILTER_KEYS].includes(k))).toString();
  const hasTarget = Boolean(params.get("hex") || params.get("lab") || params.get("word"));
  const initialKind: TargetKind = params.get("word") ? "word" : params.get("lab") ? "lab" : params.get("hex") ? "hex" : "word";
  const [kind, setKind] = useState<TargetKind>(initialKind);
  const [hex, setHex] = useState(params.get("hex") ?? "7a3fa0");
  const [selected, setSelected] = useState<string[]>([]);

  // The URL is the query: bookmarking or sharing the address repeats the search. React Query caches
  // each answer by its query string and aborts the request (signal) when the query changes.
  const search = useQuery({
    queryKey: ["colour-search", qs],
    queryFn: ({ signal }) => fetchJson<Answer>(`/api/search?${qs}`, signal),
    enabled: hasTarget,
    placeholderData: keepPreviousData,
  });

  function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const next = new URLSearchParams();
    if (kind === "picker" || kind === "hex") next.set("hex", String(form.get("hex") ?? "").replace(/^#/, ""));
    if (kind === "lab") next.set("lab", String(form.get("lab") ?? ""));
    if (kind === "word") next.set("word", String(form.get("word") ?? ""));
    for (const key of FILTER_KEYS) {
      const v = String(form.get(key) ?? "");
      if (v && v !== "any") next.set(key, v);
    }
    setSelected([]);
    router.push(`${pathname}?${next.toString()}`);
  }

  const toggle = (code: string) => setSelected((s) => (s.includes(code) ? s.filter((c) => c !== code) : s.length >= 6 ? s : [...s, code]));
  const answer = search.data;

  return (
    <>
      <Card>
        <form key={qs} onSubmit={submit} role="search" aria-label="Search by colour" className="space-y-4">
          <fieldset>
            <legend className="mb-2 text-sm font-medium">Target colour</legend>
            <div className="mb-3 flex flex-wrap gap-2" role="radiogroup" aria-label="How to give the target">
              {TARGET_KINDS.map((t) => (
                <label key={t.kind} className={`cursor-pointer rounded-full border px-3 py-1.5 text-sm ${kind === t.kind ? "border-accent bg-accent-soft text-accent" : "border-line"}`}>
                  <input type="radio" name="targetKind" value={t.kind} checked={kind === t.kind} onChange={() => setKind(t.kind)} className="sr-only" />
                  {t.label}
                </label>
              ))}
            </div>
            {kind === "picker" && (
              <label className="flex items-center gap-3 text-sm">
                <input type="color" name="hex" value={`#${hex.replace(/^#/, "")}`} onChange={(e) => setHex(e.target.value.slice(1))} className="h-11 w-16 cursor-pointer rounded border border-line" aria-label="Pick a colour" />
                <span className="tabular-nums text-ink-soft">#{hex}</span>
              </label>
            )}
            {kind === "hex" && (
              <input name="hex" aria-label="Hex colour" value={hex} onChange={(e) => setHex(e.target.value)} placeholder="7a3fa0" className="min-h-11 w-48 rounded-md border border-field px-3" />
            )}
            {kind === "lab" && <input name="lab" aria-label="CIELAB D65 as L,a,b" defaultValue={params.get("lab") ?? ""} placeholder="40,45,-50" className="min-h-11 w-48 rounded-md border border-field px-3" />}
            {kind === "word" && (
              <select name="word" aria-label="Colour name" defaultValue={params.get("word") ?? "violet"} className="min-h-11 w-48 rounded-md border border-field bg-white px-3">
                {COLOUR_WORDS.map((w) => (
                  <option key={w.word} value={w.word}>
                    {w.word}
                  </option>
                ))}
              </select>
            )}
          </fieldset>
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" name="predicted" value="include" defaultChecked={params.get("predicted") === "include"} className="h-5 w-5" />
            Include colours predicted by the solvent models (marked, with their uncertainty)
          </label>
          <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
            <MediumSelect name="medium" defaultValue={params.get("medium")} />
            <label className="text-sm font-medium">
              Acid / base
              <select name="acidBase" defaultValue={params.get("acidBase") ?? "any"} className="mt-1 min-h-11 w-full rounded-md border border-field bg-white px-3 font-normal">
                <option value="any">any</option>
                <option value="acid">acid</option>
                <option value="neutral">neutral</option>
                <option value="base">base</option>
              </select>
            </label>
            <label className="text-sm font-medium">
              One solvent
              <select name="solvent" defaultValue={params.get("solvent") ?? ""} className="mt-1 min-h-11 w-full rounded-md border border-field bg-white px-3 font-normal">
                <option value="">any solvent</option>
                {solvents.map((s) => (
                  <option key={s.id} value={s.name}>
                    {s.name}
                  </option>
                ))}
              </select>
            </label>
            <label className="text-sm font-medium">
              pH from
              <input name="phMin" inputMode="decimal" defaultValue={params.get("phMin") ?? ""} placeholder="any" className="mt-1 min-h-11 w-full rounded-md border border-field px-3 font-normal" />
            </label>
            <label className="text-sm font-medium">
              pH to
              <input name="phMax" inputMode="decimal" defaultValue={params.get("phMax") ?? ""} placeholder="any" className="mt-1 min-h-11 w-full rounded-md border border-field px-3 font-normal" />
            </label>
          </div>
          <div className="flex items-center gap-3">
            <Button type="submit">Search</Button>
            <Searching active={search.isFetching} />
          </div>
        </form>
      </Card>

      <SearchFailed error={search.isError ? search.error : null} />

      {hasTarget && answer && (
        <Card
          className="mt-4"
          title={`${count(answer.results.length, "dye")}, closest first${answer.target.word ? ` (colours called “${answer.target.word}”)` : ""}`}
          actions={
            selected.length >= 2 ? (
              <ButtonLink href={`/compare?dyes=${selected.map(encodeURIComponent).join(",")}`} variant="primary">
                Compare {count(selected.length, "dye")}
              </ButtonLink>
            ) : (
              <span className="text-sm text-ink-soft">Tick 2–6 dyes to compare them</span>
            )
          }
        >
          {answer.results.length === 0 ? (
            <p className="text-sm text-ink-soft">No accepted colour matches these conditions. Widen the medium or acid/base filter, or clear the pH range.</p>
          ) : (
            <ol className="divide-y divide-line" aria-label="Search results">
              {answer.results.map((r, i) => (
                <li key={r.dye.id} className="flex flex-wrap items-center gap-3 py-2 text-sm" data-testid="search-hit">
                  <input type="checkbox" aria-label={`Compare ${r.dye.code}`} checked={selected.includes(r.dye.code)} onChange={() => toggle(r.dye.code)} className="h-5 w-5" />
                  <span className="w-6 text-right text-ink-soft">{i + 1}</span>
                  <span className="flex items-center gap-1">
                    <Swatch lab={answer.target.lab} label="target" size="sm" />
                    {r.predicted ? <PredictedSwatch lab={r.lab} uncertaintyDeltaE00={r.uncertaintyDeltaE00 ?? 0} label={r.condition.solvent} size="md" /> : <Swatch lab={r.lab} label={r.condition.solvent} />}
                  </span>
                  <div className="min-w-0 flex-1 basis-48">
                    <Link href={`/catalogue/${encodeURIComponent(r.dye.code)}`} className="font-semibold text-accent hover:underline">
                      {r.dye.code} · {r.dye.name}
                    </Link>
                    <p className="text-ink-soft">{describeCondition(r.condition)}</p>
                  </div>
                  <Badge tone={r.predicted ? "warn" : "ok"}>{r.predicted ? "predicted" : "measured"}</Badge>
                  <span className="w-36 text-ink-soft" title="The colour is the mean CIELAB of the accepted replicates; spread is their RMS ΔE00 from that mean.">
                    {r.predicted ? "solvent model, not measured" : `mean of ${r.replicates ?? r.measurements} replicate${(r.replicates ?? r.measurements) === 1 ? "" : "s"}`}
                    {r.spreadDeltaE00 !== undefined && (r.replicates ?? 0) > 1 && <span className="block">spread ΔE00 {r.spreadDeltaE00.toFixed(1)}</span>}
                  </span>
                  <span className="w-24 text-right font-semibold tabular-nums">
                    ΔE00 {r.deltaE00.toFixed(1)}
                    {r.uncertaintyDeltaE00 != null && <span className="block text-xs font-normal text-ink-soft">± {r.uncertaintyDeltaE00.toFixed(1)}</span>}
                    {r.tieWithPrevious && (
                      <span className="block text-xs font-normal text-warn" data-testid="tie-mark" title="Differs from the result above by less than their combined uncertainty">
                        ≈ tie with the one above
                      </span>
                    )}
                  </span>
                  <KeepHit dyeId={r.dye.id} code={r.dye.code} lists={lists} note={`Search: ΔE00 ${r.deltaE00.toFixed(1)} to ${answer.target.word ?? "the target"} in ${describeCondition(r.condition)}`} />
                </li>
              ))}
            </ol>
          )}
          <p className="mt-3 text-xs text-ink-soft">
            ≈ Each dye's colour in a condition (solvent, acid/base, pH) is the mean CIELAB (D65) of its accepted replicates there. Swatches are screen approximations; decide on the numbers. ΔE00 is the CIEDE2000 difference to the target (CIE 142-2001); ΔE00 ≈ 1 is about a just-noticeable difference.
          </p>
        </Card>
      )}
    </>
  );
}
