import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { acceptedMeasurements } from "@/db/queries/bench";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import type { Lab } from "@/lib/color/types";
import { rankByColourExhaustive } from "@/lib/search/rank";
import { MEDIUM_LABELS } from "@/lib/solvents/parameters";
import { colorTargetSchema } from "@/lib/search/query";

export const metadata: Metadata = { title: "Search" };

export default async function SearchPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  await pageAccess(ANY_ROLE);
  const params = await searchParams;
  const parsed = params.hex || params.lab ? colorTargetSchema.safeParse(params) : null;
  const target: Lab | null = parsed?.success ? parsed.data.lab : null;
  const medium = params.medium ?? "any";
  const acidBase = params.acidBase ?? "any";
  const rows = target
    ? acceptedMeasurements(db()).filter(
        (r) =>
          (medium === "any" || (medium === "aprotic" ? r.solvent.medium !== "protic" : r.solvent.medium === medium)) &&
          (acidBase === "any" || r.condition.acidBase === acidBase),
      )
    : [];
  const results = target ? rankByColourExhaustive(target, rows.map((r) => ({ dyeId: r.dye.id, lab: [r.m.l, r.m.a, r.m.b] as Lab, payload: r })), 20) : [];
  return (
    <>
      <PageHeader title="Search by colour" lead="Give a target colour and a condition; each dye appears once, with its closest accepted colour, ranked by CIEDE2000 (ΔE00 ≈ 1 is about a just-noticeable difference)." />
      <Card>
        <form className="grid gap-4 md:grid-cols-5" role="search">
          <div className="md:col-span-1">
            <label htmlFor="hex" className="block text-sm font-medium">
              Colour (hex)
            </label>
            <input id="hex" name="hex" defaultValue={params.hex ?? ""} placeholder="7a3fa0" className="min-h-11 w-full rounded-lg border border-line px-3" />
          </div>
          <div className="md:col-span-1">
            <label htmlFor="lab" className="block text-sm font-medium">
              or CIELAB (D65)
            </label>
            <input id="lab" name="lab" defaultValue={params.lab ?? ""} placeholder="40,45,-50" className="min-h-11 w-full rounded-lg border border-line px-3" />
          </div>
          <div>
            <label htmlFor="medium" className="block text-sm font-medium">
              Medium
            </label>
            <select id="medium" name="medium" defaultValue={medium} className="min-h-11 w-full rounded-lg border border-line bg-white px-3">
              <option value="any">any</option>
              <option value="protic">protic</option>
              <option value="dipolar-aprotic">dipolar aprotic</option>
              <option value="nonpolar">non-polar</option>
              <option value="aprotic">aprotic (either)</option>
            </select>
          </div>
          <div>
            <label htmlFor="acidBase" className="block text-sm font-medium">
              Acid / base
            </label>
            <select id="acidBase" name="acidBase" defaultValue={acidBase} className="min-h-11 w-full rounded-lg border border-line bg-white px-3">
              <option value="any">any</option>
              <option value="acid">acid</option>
              <option value="neutral">neutral</option>
              <option value="base">base</option>
            </select>
          </div>
          <div className="flex items-end">
            <button className="min-h-11 w-full rounded-lg bg-accent px-4 font-semibold text-white">Search</button>
          </div>
        </form>
        {parsed && !parsed.success && <p className="mt-3 text-sm text-bad">{parsed.error.issues[0].message}</p>}
      </Card>
      {target && (
        <Card title={`${results.length} dyes closest to the target`} className="mt-4">
          <ol className="divide-y divide-line">
            {results.map((r, i) => (
              <li key={r.dyeId} className="flex items-center gap-4 py-2 text-sm" data-testid="search-hit">
                <span className="w-6 text-right text-ink-soft">{i + 1}</span>
                <Swatch lab={target} label="target" />
                <Swatch lab={r.lab} label={r.payload.solvent.name} />
                <div className="flex-1">
                  <Link href={`/catalogue/${encodeURIComponent(r.payload.dye.code)}`} className="font-semibold text-accent hover:underline">
                    {r.payload.dye.code} · {r.payload.dye.name}
                  </Link>
                  <p className="text-ink-soft">
                    {r.payload.solvent.name} ({MEDIUM_LABELS[r.payload.solvent.medium]}), {r.payload.condition.acidBase}
                  </p>
                </div>
                <Badge tone="ok">measured</Badge>
                <span className="w-24 text-right font-semibold tabular-nums">ΔE00 {r.deltaE00.toFixed(1)}</span>
              </li>
            ))}
          </ol>
        </Card>
      )}
    </>
  );
}
