import type { Metadata } from "next";
import { db } from "@/db/client";
import { listCalibrationTargets, listLightingProfiles } from "@/db/queries/bench";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Lighting" };

const fmt = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : "open");

export default async function LightingPage() {
  await pageAccess(ANY_ROLE);
  const handle = db();
  const profiles = listLightingProfiles(handle);
  const targets = listCalibrationTargets(handle);
  return (
    <>
      <PageHeader
        title="Lighting"
        lead="A lighting profile ties a light source and camera to a calibration target and the correction fitted to it. Every measurement names the profile it was corrected with; profiles are never mixed silently. Never look into UV or bright LED sources."
      />
      <div className="grid gap-4 lg:grid-cols-2">
        {profiles.map(({ profile, target }) => {
          const worst = Math.max(...(profile.residuals ?? []).map((r) => r.deltaE00), 0);
          return (
            <Card key={profile.id} title={profile.name} actions={profile.approvedAt ? <Badge tone="ok">approved</Badge> : <Badge tone="warn">not approved</Badge>}>
              <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
                <dt className="text-ink-soft">Stands for</dt>
                <dd>CIE illuminant {profile.illuminant}</dd>
                <dt className="text-ink-soft">Light</dt>
                <dd>{profile.lightSource}</dd>
                <dt className="text-ink-soft">Camera</dt>
                <dd>{profile.camera}</dd>
                <dt className="text-ink-soft">Target</dt>
                <dd>{target?.name ?? "none"}</dd>
                <dt className="text-ink-soft">Correction</dt>
                <dd>{profile.correctionKind}</dd>
                <dt className="text-ink-soft">Valid</dt>
                <dd>
                  {fmt(profile.validFrom)} → {fmt(profile.validUntil)}
                </dd>
                <dt className="text-ink-soft">Worst patch residual</dt>
                <dd>ΔE00 {worst.toFixed(2)}</dd>
              </dl>
              {profile.residuals && (
                <table className="mt-3 w-full text-xs">
                  <thead className="text-ink-soft">
                    <tr>
                      <th className="text-left">Patch</th>
                      <th className="text-right">residual ΔE00</th>
                    </tr>
                  </thead>
                  <tbody>
                    {profile.residuals.map((r) => (
                      <tr key={r.patch}>
                        <td>{r.patch}</td>
                        <td className="text-right tabular-nums">{r.deltaE00.toFixed(3)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}
            </Card>
          );
        })}
      </div>
      <h2 className="mb-3 mt-8 text-lg font-semibold">Calibration targets</h2>
      {targets.map((t) => (
        <Card key={t.id} title={t.name}>
          <p className="mb-3 text-sm text-ink-soft">
            {t.description} Reference white {t.whitePoint}.
          </p>
          <ul className="flex flex-wrap gap-3">
            {t.patches.map((p) => (
              <li key={p.name} className="flex flex-col items-center text-xs">
                <Swatch lab={p.lab} size="lg" label={p.name} />
                <span className="mt-1">{p.name}</span>
                <span className="text-ink-soft tabular-nums">{p.lab.map((v) => v.toFixed(1)).join(" / ")}</span>
              </li>
            ))}
          </ul>
        </Card>
      ))}
    </>
  );
}
