import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { acceptedMeasurements } from "@/db/queries/bench";
import { listDyes } from "@/db/queries/dyes";
import { PageHeader } from "@/components/ui/card";
import { Swatch, SwatchKey } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE, BENCH_ROLES, hasRole } from "@/lib/auth/roles";
import type { Lab } from "@/lib/color/types";
import { searchDyesByText } from "@/lib/search/text";
import { count } from "@/lib/text/count";

export const metadata: Metadata = { title: "Catalogue" };

export default async function CataloguePage({ searchParams }: { searchParams: Promise<{ q?: string }> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const { q = "" } = await searchParams;
  const handle = db();
  const all = listDyes(handle);
  const dyes = q ? searchDyesByText(all, q) : all;
  // One neutral swatch per solvent, ordered by ETN, gives a quick look at each dye's solvatochromism.
  const strips = new Map<string, { etn: number; lab: Lab; solvent: string }[]>();
  for (const row of acceptedMeasurements(handle)) {
    if (row.condition.acidBase !== "neutral" || row.solvent.etn === null) continue;
    const list = strips.get(row.dye.id) ?? [];
    if (!list.some((s) => s.solvent === row.solvent.name)) list.push({ etn: row.solvent.etn, lab: [row.m.l, row.m.a, row.m.b], solvent: row.solvent.name });
    strips.set(row.dye.id, list);
  }
  // Hints name codes and classes that exist in this catalogue.
  const exampleCode = all.find((d) => d.code)?.code;
  const exampleClass = all[0]?.dyeClass;
  const hint = ["e.g.", exampleClass, exampleCode].filter(Boolean).join(" ");
  return (
    <>
      <PageHeader
        title="Catalogue"
        actions={
          user && hasRole(user.role, BENCH_ROLES) ? (
            <Link href="/catalogue/new" className="inline-flex min-h-11 items-center rounded bg-accent px-4 text-sm font-semibold text-white">
              Add a dye
            </Link>
          ) : undefined
        }
        lead={q ? `${count(dyes.length, "dye")} ${dyes.length === 1 ? "matches" : "match"} “${q}” (typo-tolerant over names, codes, synonyms, CAS numbers, classes and notes).` : `${count(all.length, "dye")}. The strip shows each dye's colour in neutral solvents from least to most polar (ETN).`}
      />
      <form className="mb-4 flex max-w-xl gap-2" role="search">
        <label htmlFor="catalogue-q" className="sr-only">
          Search dyes
        </label>
        <input id="catalogue-q" name="q" defaultValue={q} type="search" placeholder={hint} className="min-h-11 min-w-0 flex-1 rounded-md border border-field bg-white px-3" />
        <button className="min-h-11 rounded-md bg-ink px-4 font-semibold text-white">Search</button>
      </form>
      <SwatchKey className="mb-3" />
      {/* Phones: one block per dye, its strip wrapping under the name. */}
      <ul className="divide-y divide-line border border-line bg-white sm:hidden" aria-label="Dyes">
        {dyes.map((d) => {
          const strip = (strips.get(d.id) ?? []).sort((x, y) => x.etn - y.etn);
          return (
            <li key={d.id} className="px-3 py-3">
              <Link href={`/catalogue/${encodeURIComponent(d.code)}`} className="block">
                <span className="font-mono text-sm font-semibold underline">{d.code}</span> <span className="font-medium">{d.name}</span>
                <span className="block text-sm text-ink-soft">
                  {d.dyeClass} · {d.acceptedCount} accepted of {count(d.measurementCount, "measurement")}
                </span>
              </Link>
              {strip.length > 0 && (
                <div className="mt-2 flex flex-wrap gap-0.5" aria-label="Colour by polarity, ETN rising">
                  {strip.map((s) => (
                    <Swatch key={s.solvent} lab={s.lab} size="sm" label={s.solvent} />
                  ))}
                </div>
              )}
            </li>
          );
        })}
      </ul>
      <div className="scroll-x hidden border border-line bg-white sm:block">
        <table className="w-full text-left text-sm">
          <thead className="border-b border-ink text-xs text-ink-soft">
            <tr>
              <th className="px-4 py-3">Code</th>
              <th className="px-4 py-3">Name</th>
              <th className="px-4 py-3">Class</th>
              <th className="px-4 py-3">Colour by polarity (ETN, dimensionless, rising →)</th>
              <th className="px-4 py-3 text-right">Accepted / all measurements</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {dyes.map((d) => {
              const strip = (strips.get(d.id) ?? []).sort((x, y) => x.etn - y.etn);
              return (
                <tr key={d.id} className="hover:bg-paper/60">
                  <td className="px-4 py-2 font-mono text-xs">
                    <Link href={`/catalogue/${encodeURIComponent(d.code)}`} className="font-semibold text-accent">
                      {d.code}
                    </Link>
                  </td>
                  <td className="px-4 py-2">{d.name}</td>
                  <td className="px-4 py-2 text-ink-soft">{d.dyeClass}</td>
                  <td className="px-4 py-2">
                    <div className="flex gap-0.5">
                      {strip.map((s) => (
                        <Swatch key={s.solvent} lab={s.lab} size="sm" label={s.solvent} />
                      ))}
                    </div>
                  </td>
                  <td className="px-4 py-2 text-right tabular-nums">
                    {d.acceptedCount} / {d.measurementCount}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {dyes.length === 0 && (
        <p className="border border-line bg-white p-6 text-sm text-ink-soft">
          No dye matches. Try fewer letters{exampleCode ? `, a code such as ${exampleCode}` : ""}{exampleClass ? `, or a class such as ${exampleClass}` : ""}.
        </p>
      )}
    </>
  );
}
