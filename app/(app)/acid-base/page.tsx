import { SERIES_LABELS, seriesRowView, type SeriesRowView } from "@/components/acid-base/format";
import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { ensurePhSeriesFit, listPhSeries } from "@/db/queries/ph-series";
import { ButtonLink } from "@/components/ui/button";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import type { Lab } from "@/lib/color/types";
import { ANY_ROLE, BENCH_ROLES, hasRole } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "pH series" };

export default async function PhSeriesPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const handle = db();
  const canEdit = hasRole(user.role, BENCH_ROLES);
  const rows = listPhSeries(handle).map((s) => seriesRowView({ ...s, fit: ensurePhSeriesFit(handle, { seriesId: s.id }) }));
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
        {rows.length === 0 ? (
          <p className="text-sm text-ink-soft">No pH series yet.{canEdit ? " Group measured vials into one, or import one from CSV." : ""}</p>
        ) : (
          <>
            <ul className="-my-3 divide-y divide-line md:hidden" aria-label="pH series" data-testid="ph-series-cards">
              {rows.map((r) => (
                <SeriesCard key={r.id} row={r} />
              ))}
            </ul>
            <div className="hidden overflow-x-auto md:block">
              <table className="w-full text-left text-sm" data-testid="ph-series-list">
                <thead className="text-xs text-ink-soft">
                  <tr>
                    <th className="py-1 pr-3">{SERIES_LABELS.dye}</th>
                    <th className="py-1 pr-3">{SERIES_LABELS.series}</th>
                    <th className="py-1 pr-3">{SERIES_LABELS.medium}</th>
                    <th className="py-1 pr-3">{SERIES_LABELS.ionicStrength}</th>
                    <th className="py-1 pr-3">{SERIES_LABELS.pka}</th>
                    <th className="py-1 pr-3">{SERIES_LABELS.transition}</th>
                    <th className="py-1">{SERIES_LABELS.forms}</th>
                  </tr>
                </thead>
                <tbody>
                  {rows.map((r) => (
                    <tr key={r.id} className="border-t border-line align-middle" data-testid="ph-series-row">
                      <td className="py-2 pr-3">
                        <DyeLink row={r} />
                      </td>
                      <td className="py-2 pr-3">
                        <Link href={r.href}>{r.name}</Link>
                      </td>
                      <td className="py-2 pr-3">{r.medium}</td>
                      <td className="py-2 pr-3 tabular-nums">{r.ionicStrength}</td>
                      {r.fitted ? (
                        <>
                          <td className="py-2 pr-3 tabular-nums">
                            {r.fitted.pka}
                            <span className="block text-xs text-ink-soft">{r.vials}</span>
                            <FitMessages messages={r.fitted.messages} />
                          </td>
                          <td className="py-2 pr-3 tabular-nums">{r.fitted.transition}</td>
                          <td className="py-2">
                            <FormSwatches colours={r.fitted.colours} />
                          </td>
                        </>
                      ) : (
                        <td colSpan={3} className="py-2 text-ink-soft">
                          {r.refusal}
                        </td>
                      )}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </>
        )}
        <p className="mt-3 text-xs text-ink-soft">
          ± is the bootstrap standard deviation of the pKa. The visual transition is where the fitted colour differs from both end colours by ΔE00 ≥ 3 (common practice, no
          source). pH in a non-aqueous or mixed medium is not aqueous pH. Swatches are screen approximations.
        </p>
      </Card>
    </>
  );
}

function DyeLink({ row }: { row: SeriesRowView }) {
  return (
    <>
      <Link href={row.dye.href} className="font-semibold">
        {row.dye.code}
      </Link>{" "}
      <span className="text-ink-soft">{row.dye.name}</span>
    </>
  );
}

function FitMessages({ messages }: { messages: string[] }) {
  return messages.map((m) => (
    <span key={m} className="mt-1 block max-w-xs text-xs">
      <Badge tone="warn">check</Badge> {m}
    </span>
  ));
}

function FormSwatches({ colours }: { colours: { lab: Lab; name: string }[] }) {
  return (
    <span className="flex flex-wrap items-center gap-1">
      {colours.map((c, i) => (
        <span key={c.name} className="flex items-center gap-1">
          {i > 0 && "→"} <Swatch lab={c.lab} size="sm" label={c.name} />
        </span>
      ))}
    </span>
  );
}

/** One series on a phone: the pKa first, the rest beneath it, nothing to scroll sideways. */
function SeriesCard({ row }: { row: SeriesRowView }) {
  const item = (label: string, value: React.ReactNode, className = "") => (
    <>
      <dt className="text-ink-soft">{label}</dt>
      <dd className={`min-w-0 ${className}`}>{value}</dd>
    </>
  );
  return (
    <li className="py-3" data-testid="ph-series-card">
      <p className="text-sm">
        <DyeLink row={row} />
      </p>
      <p className="mt-0.5 text-base font-semibold">
        <Link href={row.href} className="underline">
          {row.name}
        </Link>
      </p>
      <dl className="mt-2 grid grid-cols-[auto_minmax(0,1fr)] gap-x-3 gap-y-1 text-sm">
        {row.fitted ? (
          <>
            {item(SERIES_LABELS.pka, <span data-testid="ph-series-card-pka">{row.fitted.pka}</span>, "font-semibold tabular-nums")}
            {item(SERIES_LABELS.transition, row.fitted.transition, "tabular-nums")}
            {item(SERIES_LABELS.forms, <FormSwatches colours={row.fitted.colours} />)}
          </>
        ) : (
          item(SERIES_LABELS.pka, row.refusal, "text-ink-soft")
        )}
        {item(SERIES_LABELS.medium, row.medium)}
        {item(SERIES_LABELS.ionicStrength, row.ionicStrength, "tabular-nums")}
        {item("Vials", row.vials)}
      </dl>
      {row.fitted && <FitMessages messages={row.fitted.messages} />}
      <ButtonLink href={row.href} className="mt-2">
        Open the series
      </ButtonLink>
    </li>
  );
}
