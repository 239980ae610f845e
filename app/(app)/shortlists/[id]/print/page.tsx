import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { db } from "@/db/client";
import { acceptedMeasurements } from "@/db/queries/bench";
import { findShortlist, shortlistDyes } from "@/db/queries/shortlists";
import { PrintButton } from "@/components/shortlists/print-button";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import type { Lab } from "@/lib/color/types";
import { count } from "@/lib/text/count";

export const metadata: Metadata = { title: "Shortlist (print)" };

export default async function ShortlistPrintPage({ params }: { params: Promise<{ id: string }> }) {
  await pageAccess(ANY_ROLE);
  const { id } = await params;
  const handle = db();
  const found = findShortlist(handle, { id });
  if (!found) notFound();
  const items = shortlistDyes(handle, { shortlistId: id });
  const wanted = new Set(items.map((i) => i.dye.id));
  // A few neutral colours per dye (one per solvent) so the printout shows the response at a glance.
  const strips = new Map<string, { solvent: string; lab: Lab }[]>();
  for (const r of acceptedMeasurements(handle)) {
    if (!wanted.has(r.dye.id) || r.condition.acidBase !== "neutral") continue;
    const list = strips.get(r.dye.id) ?? [];
    if (!list.some((s) => s.solvent === r.solvent.name)) list.push({ solvent: r.solvent.name, lab: [r.m.l, r.m.a, r.m.b] });
    strips.set(r.dye.id, list);
  }
  return (
    <article className="mx-auto max-w-4xl bg-white p-6 print:p-0">
      <div className="no-print mb-4 flex justify-end">
        <PrintButton />
      </div>
      <h1 className="text-2xl font-bold">{found.list.name}</h1>
      <p className="text-sm text-ink-soft">
        Kept by {found.owner} · printed {new Date().toISOString().slice(0, 10)} · {count(items.length, "dye")}
      </p>
      {found.list.notes && <p className="mt-2 text-sm">{found.list.notes}</p>}
      <table className="mt-4 w-full border-collapse text-left text-sm">
        <thead>
          <tr className="border-b border-ink">
            <th className="py-2 pr-2">Code</th>
            <th className="py-2 pr-2">Name · class</th>
            <th className="py-2 pr-2">Neutral colours (by solvent)</th>
            <th className="py-2 pr-2">Note</th>
          </tr>
        </thead>
        <tbody>
          {items.map(({ item, dye, accepted }) => (
            <tr key={item.id} className="break-inside-avoid border-b border-line align-top">
              <td className="py-2 pr-2 font-mono">{dye.code}</td>
              <td className="py-2 pr-2">
                {dye.name}
                <br />
                <span className="text-ink-soft">
                  {dye.dyeClass} · {accepted} accepted measurements
                </span>
                {dye.hazards && <p className="text-xs">Hazards: {dye.hazards}</p>}
              </td>
              <td className="py-2 pr-2">
                <span className="flex flex-wrap gap-1">
                  {(strips.get(dye.id) ?? []).slice(0, 12).map((s) => (
                    <Swatch key={s.solvent} lab={s.lab} size="sm" label={s.solvent} />
                  ))}
                </span>
              </td>
              <td className="py-2 pr-2">{item.note}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-4 text-xs text-ink-soft">
        Printed and on-screen colours are approximations of the measured CIELAB values. Handle dyes and solvents with gloves, eye protection and a fume hood as the supplier's safety data sheet says; local rules and your safety officer come first.
      </p>
    </article>
  );
}
