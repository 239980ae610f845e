import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { acceptedMeasurements } from "@/db/queries/bench";
import { listDyes } from "@/db/queries/dyes";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import type { Lab } from "@/lib/color/types";
import { deltaE00Matrix, meanLab, parseDyeCodes } from "@/lib/search/compare";
import { MEDIUM_LABELS, type MediumClass } from "@/lib/solvents/parameters";

export const metadata: Metadata = { title: "Compare dyes" };

type Row = { key: string; label: string; medium: MediumClass; et30: number | null; acidBase: string; ph: number | null };

export default async function ComparePage({ searchParams }: { searchParams: Promise<{ dyes?: string; add?: string; at?: string }> }) {
  await pageAccess(ANY_ROLE);
  const params = await searchParams;
  const { codes, dropped } = parseDyeCodes(params.dyes, params.add);
  const handle = db();
  const all = listDyes(handle);
  const byCode = new Map(all.map((d) => [d.code, d]));
  const chosen = codes.map((c) => byCode.get(c)).filter((d): d is NonNullable<typeof d> => Boolean(d));
  const unknown = codes.filter((c) => !byCode.has(c));
  const ids = new Set(chosen.map((d) => d.id));

  // Mean accepted colour per dye and condition (solvent × acid/base × pH).
  const rows = new Map<string, Row>();
  const cells = new Map<string, Map<string, Lab[]>>();
  for (const r of acceptedMeasurements(handle)) {
    if (!ids.has(r.dye.id)) continue;
    const key = `${r.solvent.id}|${r.condition.acidBase}|${r.condition.ph ?? ""}`;
    if (!rows.has(key)) rows.set(key, { key, label: r.solvent.name, medium: r.solvent.medium, et30: r.solvent.et30, acidBase: r.condition.acidBase, ph: r.condition.ph });
    const perDye = cells.get(key) ?? new Map<string, Lab[]>();
    perDye.set(r.dye.id, [...(perDye.get(r.dye.id) ?? []), [r.m.l, r.m.a, r.m.b]]);
    cells.set(key, perDye);
  }
  const colour = (key: string, dyeId: string): Lab | null => {
    const labs = cells.get(key)?.get(dyeId);
    return labs?.length ? meanLab(labs) : null;
  };
  const ordered = [...rows.values()].sort(
    (x, y) => ["protic", "dipolar-aprotic", "nonpolar"].indexOf(x.medium) - ["protic", "dipolar-aprotic", "nonpolar"].indexOf(y.medium) || (y.et30 ?? 0) - (x.et30 ?? 0) || x.acidBase.localeCompare(y.acidBase) || (x.ph ?? 0) - (y.ph ?? 0),
  );
  const coverage = (key: string) => chosen.filter((d) => colour(key, d.id)).length;
  const at = params.at && rows.has(params.at) ? params.at : [...ordered].sort((x, y) => coverage(y.key) - coverage(x.key))[0]?.key;
  const matrix = at ? deltaE00Matrix(chosen.map((d) => colour(at, d.id))) : [];
  const href = (list: string[], extra = "") => `/compare?dyes=${list.map(encodeURIComponent).join(",")}${extra}`;
  const atRow = at ? rows.get(at) : undefined;

  return (
    <>
      <PageHeader title="Compare dyes" lead="Up to six dyes side by side across every condition they were measured in (mean of accepted colours), with the CIEDE2000 difference between them under one condition." />
      {(unknown.length > 0 || dropped > 0) && (
        <div className="mb-4">
          <Notice tone="caution">
            {unknown.length > 0 && <>No dye with the code {unknown.join(", ")}. </>}
            {dropped > 0 && <>Only six dyes can be compared at once; {dropped} left out.</>}
          </Notice>
        </div>
      )}
      <Card className="mb-4">
        <form className="flex flex-wrap items-end gap-3" aria-label="Add a dye to the comparison">
          <input type="hidden" name="dyes" value={chosen.map((d) => d.code).join(",")} />
          <label className="text-sm font-medium">
            Add a dye
            <select name="add" className="mt-1 block min-h-11 min-w-64 rounded-lg border border-line bg-white px-3 font-normal" disabled={chosen.length >= 6}>
              {all
                .filter((d) => !ids.has(d.id))
                .map((d) => (
                  <option key={d.id} value={d.code}>
                    {d.code} · {d.name}
                  </option>
                ))}
            </select>
          </label>
          <button className="min-h-11 rounded-lg bg-accent px-4 font-semibold text-white disabled:opacity-50" disabled={chosen.length >= 6}>
            Add
          </button>
          <span className="flex flex-wrap gap-2 text-sm">
            {chosen.map((d) => (
              <Link key={d.id} href={href(chosen.filter((x) => x.id !== d.id).map((x) => x.code))} className="rounded-full border border-line px-3 py-1 hover:bg-paper-deep" aria-label={`Remove ${d.code} from the comparison`}>
                {d.code} ✕
              </Link>
            ))}
          </span>
        </form>
      </Card>
      {chosen.length === 0 ? (
        <p className="rounded-xl border border-line bg-white p-6 text-sm">Pick dyes above, or tick them in a search and choose Compare.</p>
      ) : (
        <div className="grid gap-4 xl:grid-cols-3">
          <Card title="Across conditions" className="xl:col-span-2">
            <div className="overflow-x-auto">
              <table className="w-full text-left text-sm" aria-label="Colours across conditions">
                <thead>
                  <tr className="border-b border-line text-xs text-ink-soft">
                    <th className="py-2 pr-3">Condition</th>
                    {chosen.map((d) => (
                      <th key={d.id} className="px-2 py-2 text-center">
                        <Link href={`/catalogue/${encodeURIComponent(d.code)}`} className="text-accent hover:underline">
                          {d.code}
                        </Link>
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody className="divide-y divide-line">
                  {ordered.map((row, i) => (
                    <tr key={row.key} className={row.key === at ? "bg-accent-soft/40" : undefined}>
                      <td className="py-1.5 pr-3">
                        {(i === 0 || ordered[i - 1].medium !== row.medium) && <span className="block text-xs font-semibold text-ink-soft">{MEDIUM_LABELS[row.medium]}</span>}
                        <Link href={href(chosen.map((d) => d.code), `&at=${encodeURIComponent(row.key)}`)} className="hover:underline">
                          {row.label}, {row.acidBase}
                          {row.ph !== null ? ` pH ${row.ph}` : ""}
                        </Link>
                      </td>
                      {chosen.map((d) => {
                        const lab = colour(row.key, d.id);
                        return <td key={d.id} className="px-2 py-1.5 text-center">{lab ? <Swatch lab={lab} size="sm" label={`${d.code} in ${row.label}`} /> : <span className="text-ink-soft">—</span>}</td>;
                      })}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <p className="mt-2 text-xs text-ink-soft">Choose a condition to see the ΔE00 matrix for it. Swatches approximate the measured values on screen.</p>
          </Card>
          <Card title={atRow ? `ΔE00 between the dyes: ${atRow.label}, ${atRow.acidBase}${atRow.ph !== null ? ` pH ${atRow.ph}` : ""}` : "ΔE00 between the dyes"}>
            {chosen.length < 2 ? (
              <p className="text-sm text-ink-soft">Add a second dye to see differences.</p>
            ) : (
              <table className="w-full text-sm tabular-nums" aria-label="ΔE00 matrix">
                <thead>
                  <tr>
                    <th />
                    {chosen.map((d) => (
                      <th key={d.id} className="px-1 py-1 text-xs">
                        {d.code}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {chosen.map((d, i) => (
                    <tr key={d.id}>
                      <th className="py-1 pr-2 text-left text-xs">{d.code}</th>
                      {matrix[i].map((v, j) => (
                        <td key={j} className="px-1 py-1 text-center">
                          {v === null ? "—" : v.toFixed(1)}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
            <p className="mt-2 text-xs text-ink-soft">— : a dye not measured under this condition. ΔE00 ≈ 1 is about a just-noticeable difference.</p>
          </Card>
        </div>
      )}
    </>
  );
}
