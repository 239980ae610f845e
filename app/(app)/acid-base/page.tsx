import { formColours, pkaText, transitionText } from "@/components/acid-base/format";
import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { ensurePhSeriesFit, listPhSeries } from "@/db/queries/ph-series";
import { ButtonLink } from "@/components/ui/button";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE, BENCH_ROLES, hasRole } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "pH series" };

export default async function PhSeriesPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const handle = db();
  const canEdit = hasRole(user.role, BENCH_ROLES);
  const list = listPhSeries(handle).map((s) => ({ ...s, fit: ensurePhSeriesFit(handle, { seriesId: s.id }) }));
  return (
    <>
      <PageHeader
        title="pH series"
        lead="Vials of one dye in one medium, each with its pH, grouped by a chemist. Each series' apparent pKa (for its medium and ionic strength) is fitted from its accepted vials and stored; it is fitted again when the vials change."
        actions={
          canEdit ? (
            <>
              <ButtonLink href="/acid-base/new" variant="primary">
                Group vials into a series
              </ButtonLink>
              <ButtonLink href="/acid-base/import">Import a series from CSV</ButtonLink>
            </>
          ) : undefined
        }
      />
      <Card>
        {list.length === 0 ? (
          <p className="text-sm text-ink-soft">No pH series yet.{canEdit ? " Group measured vials into one, or import one from CSV." : ""}</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="ph-series-list">
              <thead className="text-xs text-ink-soft">
                <tr>
                  <th className="py-1 pr-3">Dye</th>
                  <th className="py-1 pr-3">Series</th>
                  <th className="py-1 pr-3">Medium</th>
                  <th className="py-1 pr-3">Ionic strength</th>
                  <th className="py-1 pr-3">Apparent pKa</th>
                  <th className="py-1 pr-3">Visual transition</th>
                  <th className="py-1">Acid → base form</th>
                </tr>
              </thead>
              <tbody>
                {list.map((s) => (
                  <tr key={s.id} className="border-t border-line align-middle" data-testid="ph-series-row">
                    <td className="py-2 pr-3">
                      <Link href={`/catalogue/${encodeURIComponent(s.dye.code)}`} className="font-semibold">
                        {s.dye.code}
                      </Link>{" "}
                      <span className="text-ink-soft">{s.dye.name}</span>
                    </td>
                    <td className="py-2 pr-3">
                      <Link href={`/acid-base/${encodeURIComponent(s.id)}`}>{s.name}</Link>
                    </td>
                    <td className="py-2 pr-3">{s.mediumLabel}</td>
                    <td className="py-2 pr-3 tabular-nums">{s.ionicStrengthMolL === null ? "not recorded" : `${s.ionicStrengthMolL} mol/L`}</td>
                    {s.fit.ok ? (
                      <>
                        <td className="py-2 pr-3 tabular-nums">
                          {pkaText(s.fit)}
                          <span className="block text-xs text-ink-soft">{s.fit.vials} accepted vials</span>
                          {s.fit.fit.messages.map((m) => (
                            <span key={m} className="mt-1 block max-w-xs text-xs">
                              <Badge tone="warn">check</Badge> {m}
                            </span>
                          ))}
                        </td>
                        <td className="py-2 pr-3 tabular-nums">{transitionText(s.fit)}</td>
                        <td className="py-2">
                          <span className="flex items-center gap-1">
                            {formColours(s.fit).map((c, i) => (
                              <span key={c.name} className="flex items-center gap-1">
                                {i > 0 && "→"} <Swatch lab={c.lab} size="sm" label={c.name} />
                              </span>
                            ))}
                          </span>
                        </td>
                      </>
                    ) : (
                      <td colSpan={3} className="py-2 text-ink-soft">
                        No pKa ({s.fit.vials} accepted vials): {s.fit.error}
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        <p className="mt-3 text-xs text-ink-soft">
          ± is the bootstrap standard deviation of the pKa. The visual transition is where the fitted colour differs from both end colours by ΔE00 ≥ 3 (common practice, no
          source). pH in a non-aqueous or mixed medium is not aqueous pH. Swatches are screen approximations.
        </p>
      </Card>
    </>
  );
}
