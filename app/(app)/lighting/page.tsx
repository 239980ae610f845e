import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { driftHistory, listCheckStandards, listProfiles } from "@/db/queries/lighting";
import { listCalibrationTargets } from "@/db/queries/bench";
import { AccuracyNotes } from "@/components/lighting/accuracy-notes";
import { retireCheckStandardAction } from "@/app/actions/lighting";
import { ActionButton } from "@/components/lighting/action-button";
import { CheckStandardForm, ProfileForm, TargetForm } from "@/components/lighting/forms";
import { ProfileStatusBadge } from "@/components/lighting/status-badge";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { Swatch } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { labD50ToLabD65 } from "@/lib/color/convert";
import { profileStatus } from "@/lib/lighting/status";

export const metadata: Metadata = { title: "Lighting" };

const fmt = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : "open");
const de = (v: number | null) => (v === null ? "not fitted" : `${v.toFixed(2)} ΔE00`);

export default async function LightingPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const isAdmin = user?.role === "admin";
  const handle = db();
  const profiles = listProfiles(handle);
  const targets = listCalibrationTargets(handle);
  const standards = listCheckStandards(handle);
  const now = new Date();
  const drifting = profiles
    .map(({ profile }) => ({ profile, flagged: driftHistory(handle, { profileId: profile.id }).filter((d) => d.flagged) }))
    .filter((d) => d.flagged.length > 0);
  return (
    <>
      <PageHeader
        title="Lighting"
        lead="A lighting profile ties a light source and camera to a calibration target and the correction fitted to it. Admins create drafts, fit them from a card photo and approve them; only approved profiles inside their validity window can be chosen on the bench. Every measurement names the profile it was corrected with."
      />
      <div className="mb-4 grid gap-4 lg:grid-cols-2">
        <AccuracyNotes />
        <SafetyNotice />
      </div>
      {isAdmin && drifting.length > 0 && (
        <div className="mb-4">
          <Notice tone="caution" title="Light drift">
            {drifting.map((d) => (
              <span key={d.profile.id} className="block">
                “{d.profile.name}”: {d.flagged.length} reference reading{d.flagged.length === 1 ? "" : "s"} above the drift limit (latest {d.flagged.at(-1)!.deltaE00.toFixed(2)} ΔE00).{" "}
                <Link className="underline" href={`/lighting/profiles/${d.profile.id}`}>
                  Look at the profile
                </Link>
              </span>
            ))}
          </Notice>
        </div>
      )}
      <h2 className="mb-3 text-lg font-semibold">Profiles</h2>
      <div className="grid gap-4 lg:grid-cols-2">
        {profiles.map(({ profile, target }) => (
          <Card key={profile.id} title={<Link href={`/lighting/profiles/${profile.id}`}>{profile.name}</Link>} actions={<ProfileStatusBadge status={profileStatus(profile, now)} />}>
            <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
              <dt className="text-ink-soft">Stands for</dt>
              <dd>CIE illuminant {profile.illuminant}{profile.colourTemperatureK ? `, ${profile.colourTemperatureK} K` : ""}</dd>
              <dt className="text-ink-soft">Light</dt>
              <dd>{profile.lightSource}</dd>
              <dt className="text-ink-soft">Camera</dt>
              <dd>{profile.camera}</dd>
              <dt className="text-ink-soft">Target</dt>
              <dd>{target?.name ?? "none"}</dd>
              <dt className="text-ink-soft">Method</dt>
              <dd>{profile.method ?? profile.correctionKind}</dd>
              <dt className="text-ink-soft">Valid</dt>
              <dd>
                {fmt(profile.validFrom)} → {fmt(profile.validUntil)}
              </dd>
              <dt className="text-ink-soft">Leave-one-out mean / worst</dt>
              <dd>
                {de(profile.looMeanDeltaE00)} / {de(profile.looMaxDeltaE00)}
              </dd>
            </dl>
            <p className="mt-3 text-sm">
              <Link className="text-accent underline" href={`/lighting/profiles/${profile.id}`}>
                Residuals, accuracy history{isAdmin ? ", fit and approval" : ""}
              </Link>
            </p>
          </Card>
        ))}
      </div>
      {isAdmin && (
        <Card title="New draft profile" className="mt-4">
          <ProfileForm targets={targets.map((t) => ({ id: t.id, name: t.name }))} />
        </Card>
      )}
      <h2 className="mb-3 mt-8 text-lg font-semibold">Calibration targets</h2>
      {targets.map((t) => (
        <Card key={t.id} title={t.name} className="mb-4">
          <p className="mb-3 text-sm text-ink-soft">
            {t.description} Values under {t.whitePoint}
            {t.source ? ` (${t.source})` : ""}; numbers under each patch are L* / a* / b*. Layout: {t.gridRows && t.gridColumns ? `${t.gridRows} rows × ${t.gridColumns} columns` : "not given"}.
          </p>
          <ul className="flex flex-wrap gap-3">
            {t.patches.map((p) => (
              <li key={p.name} className="flex flex-col items-center text-xs">
                <Swatch lab={t.whitePoint === "D50" ? labD50ToLabD65(p.lab) : p.lab} size="lg" label={p.name} />
                <span className="mt-1">{p.name}</span>
                <span className="text-ink-soft tabular-nums">{p.lab.map((v) => v.toFixed(1).replace(/^-0\.0$/, "0.0")).join(" / ")}</span>
              </li>
            ))}
          </ul>
          {isAdmin && (
            <details className="mt-3">
              <summary className="cursor-pointer text-sm text-accent">Edit this target</summary>
              <div className="mt-3">
                <TargetForm
                  values={{
                    id: t.id,
                    name: t.name,
                    description: t.description,
                    source: t.source,
                    whitePoint: t.whitePoint,
                    gridRows: t.gridRows,
                    gridColumns: t.gridColumns,
                    csv: ["name,L*,a*,b*,white point", ...t.patches.map((p) => `${p.name},${p.lab.join(",")},${t.whitePoint}`)].join("\n"),
                  }}
                />
              </div>
            </details>
          )}
        </Card>
      ))}
      {isAdmin && (
        <Card title="New calibration target" className="mb-4">
          <TargetForm />
        </Card>
      )}
      <h2 className="mb-3 mt-8 text-lg font-semibold">Check standards</h2>
      <p className="mb-3 text-sm text-ink-soft">
        Sealed vials or tiles whose CIELAB was measured on a spectrophotometer. When one is marked in a bench photo, its ΔE00 to the known value is recorded: that history, per profile, is the lab&apos;s real accuracy.
      </p>
      {standards.length === 0 ? (
        <p className="mb-3 text-sm">No check standards registered yet.</p>
      ) : (
        <ul className="mb-4 space-y-2 text-sm">
          {standards.map((s) => (
            <li key={s.id} data-testid="check-standard" data-name={s.name}>
              <strong>{s.name}</strong> ({s.kind}): L* {s.l.toFixed(2)}, a* {s.a.toFixed(2)}, b* {s.b.toFixed(2)} under {s.whitePoint}; measured with {s.sourceInstrument}; {s.readings} reading
              {s.readings === 1 ? "" : "s"}
              {s.retiredAt && <span className="text-ink-soft"> · retired {s.retiredAt.toISOString().slice(0, 10)}, no longer offered on the bench; its readings stay in the check histories</span>}
              {isAdmin && !s.retiredAt && (
                <details className="mt-1">
                  <summary className="cursor-pointer text-accent">Edit or retire {s.name}</summary>
                  <div className="mt-2 space-y-3">
                    <CheckStandardForm values={{ id: s.id, name: s.name, kind: s.kind, l: s.l, a: s.a, b: s.b, whitePoint: s.whitePoint, sourceInstrument: s.sourceInstrument, notes: s.notes, readings: s.readings }} />
                    <ActionButton action={retireCheckStandardAction} fields={{ id: s.id }} label={`Retire ${s.name}`} pendingText="Retiring…" variant="danger">
                      <p className="text-xs text-ink-soft">Retired, it is no longer offered on the bench; its readings stay in the profiles&apos; check histories.</p>
                    </ActionButton>
                  </div>
                </details>
              )}
            </li>
          ))}
        </ul>
      )}
      {isAdmin && (
        <Card title="Register a check standard">
          <CheckStandardForm />
        </Card>
      )}
    </>
  );
}
