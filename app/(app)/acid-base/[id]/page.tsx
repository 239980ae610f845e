import { pkaText, transitionText } from "@/components/acid-base/format";
import { StepsChoice } from "@/components/acid-base/steps-choice";
import { SeriesBlock, TWO_STEP_NOTE, seriesBlock } from "@/components/acid-base/titration-section";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { db } from "@/db/client";
import { candidateVials, ensurePhSeriesFit, getPhSeries } from "@/db/queries/ph-series";
import { SeriesEditor } from "@/components/acid-base/series-editor";
import { editorVials } from "@/components/acid-base/medium-picker";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE, BENCH_ROLES, hasRole } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "pH series" };

export default async function PhSeriesDetailPage({ params }: { params: Promise<{ id: string }> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const { id } = await params;
  const handle = db();
  const series = getPhSeries(handle, { id: decodeURIComponent(id) });
  if (!series) notFound();
  const fit = ensurePhSeriesFit(handle, { seriesId: series.id });
  const canEdit = hasRole(user.role, BENCH_ROLES);
  const medium = { dyeId: series.dye.id, solventId: series.solvent.id, secondSolventId: series.secondSolvent?.id ?? null, secondSolventMoleFraction: series.secondSolventMoleFraction };
  return (
    <>
      <PageHeader
        title={series.name}
        lead={
          <>
            <Link href={`/catalogue/${encodeURIComponent(series.dye.code)}`}>
              {series.dye.code} · {series.dye.name}
            </Link>{" "}
            in {series.mediumLabel}, ionic strength {series.ionicStrengthMolL === null ? "not recorded" : `${series.ionicStrengthMolL} mol/L`}.{" "}
            {fit.ok
              ? `Apparent ${pkaText(fit)} from ${fit.vials} accepted vials; visual transition ${transitionText(fit)}.`
              : `No pKa from ${fit.vials} accepted vials: ${fit.error}`}
          </>
        }
      />
      <Card title="pKa and titration curve">
        <SeriesBlock block={seriesBlock(series, fit)} />
        {canEdit && (
          <div className="mt-4 border-t border-line pt-4">
            <StepsChoice seriesId={series.id} steps={fit.steps} />
          </div>
        )}
        <p className="mt-4 text-xs text-ink-soft">
          ± is the standard deviation of refits over vials resampled with replacement (bootstrap); shaded: where the colour differs from both neighbouring forms by ΔE00 ≥ 3
          (common practice, no source). {fit.steps === 2 && TWO_STEP_NOTE}
        </p>
      </Card>
      {canEdit ? (
        <Card title="Vials" className="mt-4">
          <SeriesEditor
            seriesId={series.id}
            head={{ ...medium, name: series.name, ionicStrengthMolL: series.ionicStrengthMolL, notes: series.notes }}
            mediumLabel={series.mediumLabel}
            candidates={editorVials(candidateVials(handle, medium))}
            selected={Object.fromEntries(series.vials.map((v) => [v.measurementId, v.pH]))}
          />
        </Card>
      ) : (
        <Card title={`${series.vials.length} vials`} className="mt-4">
          <table className="w-full text-left text-sm" data-testid="series-vials">
            <thead className="text-xs text-ink-soft">
              <tr>
                <th className="py-1 pr-3">pH</th>
                <th className="py-1 pr-3">Colour (CIELAB D65)</th>
                <th className="py-1 pr-3">Source</th>
                <th className="py-1">Review</th>
              </tr>
            </thead>
            <tbody>
              {series.vials.map((v) => (
                <tr key={v.measurementId} className="border-t border-line">
                  <td className="py-1 pr-3 tabular-nums">{v.pH}</td>
                  <td className="py-1 pr-3">
                    <span className="flex items-center gap-2 tabular-nums">
                      <Swatch lab={v.lab} size="sm" />
                      {v.lab.map((x) => x.toFixed(1)).join(", ")}
                    </span>
                  </td>
                  <td className="py-1 pr-3 text-ink-soft">{v.source}</td>
                  <td className="py-1">
                    <Badge tone={v.reviewState === "accepted" ? "ok" : "warn"}>{v.reviewState}</Badge>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          {series.notes && <p className="mt-3 text-sm text-ink-soft">{series.notes}</p>}
        </Card>
      )}
    </>
  );
}
