import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { db } from "@/db/client";
import { findShortlist, shortlistConditionColours, shortlistDyes } from "@/db/queries/shortlists";
import { PrintButton } from "@/components/shortlists/print-button";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { coloursByDye, conditionName, summariseByCondition } from "@/lib/search/shortlist-csv";
import { count } from "@/lib/text/count";

export const metadata: Metadata = { title: "Shortlist (print)" };

export default async function ShortlistPrintPage({ params }: { params: Promise<{ id: string }> }) {
  await pageAccess(ANY_ROLE);
  const { id } = await params;
  const handle = db();
  const found = findShortlist(handle, { id });
  if (!found) notFound();
  const items = shortlistDyes(handle, { shortlistId: id });
  const colours = summariseByCondition(shortlistConditionColours(handle, { shortlistId: id }));
  const byDye = coloursByDye(colours);
  const fmt = (v: number | null | undefined, digits: number) => (v === null || v === undefined ? "—" : v.toFixed(digits));
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
      {items.map(({ item, dye, accepted }) => {
        const list = byDye.get(dye.code) ?? [];
        return (
          <section key={item.id} className="mt-6 break-inside-avoid border-t-2 border-ink pt-3">
            <h2 className="text-lg font-bold">
              <span className="font-mono">{dye.code}</span> · {dye.name}
            </h2>
            <p className="text-sm text-ink-soft">
              {dye.dyeClass} · {count(accepted, "accepted measurement")}
              {item.note ? ` · Note: ${item.note}` : ""}
            </p>
            {dye.hazards && <p className="text-xs">Hazards: {dye.hazards}</p>}
            {list.length === 0 ? (
              <p className="mt-2 text-sm text-ink-soft">No accepted colours yet.</p>
            ) : (
              <div className="scroll-x mt-2">
                <table className="w-full border-collapse text-left text-xs tabular-nums">
                  <thead>
                    <tr className="border-b border-ink align-bottom">
                      <th className="py-1 pr-2"> </th>
                      <th className="py-1 pr-2">Condition</th>
                      <th className="py-1 pr-2 text-right">n</th>
                      <th className="py-1 pr-2 text-right">L* ± sd</th>
                      <th className="py-1 pr-2 text-right">a* ± sd</th>
                      <th className="py-1 pr-2 text-right">b* ± sd</th>
                      <th className="py-1 pr-2 text-right">C*ab</th>
                      <th className="py-1 pr-2 text-right">hab (°)</th>
                      <th className="py-1 pr-2 text-right">ET(30) (kcal/mol)</th>
                      <th className="py-1 pr-2 text-right">α</th>
                      <th className="py-1 pr-2 text-right">β</th>
                      <th className="py-1 pr-2 text-right">π*</th>
                    </tr>
                  </thead>
                  <tbody>
                    {list.map((c) => (
                      <tr key={c.conditionId + c.whitePoint} className="border-b border-line">
                        <td className="py-1 pr-2">
                          <Swatch lab={c.mean} size="sm" label={conditionName(c)} />
                        </td>
                        <td className="py-1 pr-2">{conditionName(c)}</td>
                        <td className="py-1 pr-2 text-right">{c.n}</td>
                        {[0, 1, 2].map((k) => (
                          <td key={k} className="py-1 pr-2 text-right">
                            {c.mean[k].toFixed(1)}
                            {c.sd ? ` ± ${c.sd[k].toFixed(1)}` : ""}
                          </td>
                        ))}
                        <td className="py-1 pr-2 text-right">{c.chroma.toFixed(1)}</td>
                        <td className="py-1 pr-2 text-right">{c.hueDeg.toFixed(0)}</td>
                        <td className="py-1 pr-2 text-right">{fmt(c.solventParameters.et30, 1)}</td>
                        <td className="py-1 pr-2 text-right">{fmt(c.solventParameters.alpha, 2)}</td>
                        <td className="py-1 pr-2 text-right">{fmt(c.solventParameters.beta, 2)}</td>
                        <td className="py-1 pr-2 text-right">{fmt(c.solventParameters.piStar, 2)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
          </section>
        );
      })}
      <p className="mt-4 text-xs text-ink-soft">
        CIELAB relative to {colours[0]?.whitePoint ?? "D65"}; each row is the mean of the accepted replicates in that condition, ± their sample standard deviation when there are two or more. Solvent parameters with their sources are on the Solvents page. Printed and on-screen colours are approximations of the measured CIELAB values. Handle dyes and solvents with gloves, eye protection and a fume hood as the supplier's safety data sheet says; local rules and your safety officer come first.
      </p>
    </article>
  );
}
