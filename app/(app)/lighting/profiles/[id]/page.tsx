import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { approveProfileAction, rederiveAction, reopenProfileAction, retireProfileAction } from "@/app/actions/lighting";
import { db } from "@/db/client";
import { listCalibrationTargets } from "@/db/queries/bench";
import { checkHistory, driftHistory, getProfile, getTarget, previewRederive } from "@/db/queries/lighting";
import { ActionButton } from "@/components/lighting/action-button";
import { AccuracyNotes } from "@/components/lighting/accuracy-notes";
import { CardFit } from "@/components/lighting/card-fit";
import { ProfileForm } from "@/components/lighting/forms";
import { HistoryChart } from "@/components/lighting/history-chart";
import { ProfileStatusBadge } from "@/components/lighting/status-badge";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { Field, TextInput } from "@/components/ui/field";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { labD50ToLabD65, labToHex, linearSrgbToHex } from "@/lib/color/convert";
import { methodName } from "@/lib/color/calibration";
import { DEFAULT_TOLERANCE, profileColour, methodsTried } from "@/lib/lighting/calibration";
import { profileStatus } from "@/lib/lighting/status";
import { DRIFT_LIMIT_DE00 } from "@/lib/bench/pipeline";
import type { GridCorners } from "@/db/schema";

export const metadata: Metadata = { title: "Lighting profile" };

const day = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : "");
const f2 = (v: number | null | undefined) => (v === null || v === undefined ? "—" : v.toFixed(2));

export default async function ProfilePage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ created?: string }> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const isAdmin = user.role === "admin";
  const { id } = await params;
  const { created } = await searchParams;
  const handle = db();
  const p = getProfile(handle, id);
  if (!p) notFound();
  const status = profileStatus(p);
  const target = p.targetId ? getTarget(handle, p.targetId) : undefined;
  // A stored fit that cannot be read shows its problem instead of breaking the page.
  const tried = methodsTried(p);
  const fitted = p.correctionKind !== "none" && !tried.problem;
  const checks = checkHistory(handle, { profileId: p.id });
  const drift = driftHistory(handle, { profileId: p.id });
  const preview = isAdmin && p.state === "approved" && fitted ? previewRederive(handle, { profileId: p.id }) : null;
  const onHull = new Set(tried.hullPatches);
  const targetLab = (name: string) => {
    const patch = target?.patches.find((t) => t.name === name);
    if (!patch) return null;
    return target!.whitePoint === "D50" ? labD50ToLabD65(patch.lab) : patch.lab;
  };
  return (
    <>
      <PageHeader title={p.name} lead={`${p.lightSource} · ${p.camera} · CIE illuminant ${p.illuminant}`} actions={<ProfileStatusBadge status={status} />} />
      <p className="mb-4 text-sm">
        <Link className="text-accent underline" href="/lighting">
          All lighting profiles
        </Link>
      </p>
      {tried.problem && (
        <div className="mb-4" data-testid="fit-problem">
          <Notice tone="error" title="This profile's fit cannot be read">
            {tried.problem}
          </Notice>
        </div>
      )}
      {created === "1" && isAdmin && p.state === "draft" && (
        <div className="mb-4" data-testid="draft-created">
          <Notice tone="ok">Draft “{p.name}” created. Next, upload a photo of the card under this light and fit it below.</Notice>
        </div>
      )}
      <div className="grid gap-4 lg:grid-cols-2">
        <Card title="Profile">
          <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
            <dt className="text-ink-soft">State</dt>
            <dd data-testid="profile-state">{p.state}{status !== p.state ? ` (${status} now)` : ""}</dd>
            <dt className="text-ink-soft">Colour temperature</dt>
            <dd>{p.colourTemperatureK ? `${p.colourTemperatureK} K` : "not given"}</dd>
            <dt className="text-ink-soft">Camera settings</dt>
            <dd>{p.cameraSettings || "not given"}</dd>
            <dt className="text-ink-soft">Target</dt>
            <dd>{target ? `${target.name} (values under ${target.whitePoint})` : "none"}</dd>
            <dt className="text-ink-soft">Method</dt>
            <dd>{p.method ?? "—"}{p.correctionKind !== "none" ? `; fitted: ${p.correctionKind}` : "; not fitted yet"}</dd>
            <dt className="text-ink-soft">Valid</dt>
            <dd>{day(p.validFrom)} → {day(p.validUntil) || "open"}</dd>
            <dt className="text-ink-soft">Leave-one-out ΔE00</dt>
            <dd data-testid="loo-summary">mean {f2(p.looMeanDeltaE00)}, worst {f2(p.looMaxDeltaE00)}</dd>
            <dt className="text-ink-soft">Approved</dt>
            <dd>{p.approvedAt ? day(p.approvedAt) : "no"}</dd>
            {p.retiredAt && (
              <>
                <dt className="text-ink-soft">Retired</dt>
                <dd>{day(p.retiredAt)}</dd>
              </>
            )}
            {p.notes && (
              <>
                <dt className="text-ink-soft">Notes</dt>
                <dd>{p.notes}</dd>
              </>
            )}
          </dl>
        </Card>
        <AccuracyNotes />
      </div>

      {p.residuals && (
        <Card title="Residuals per patch (ΔE00, CIEDE2000)" className="mt-4">
          <p className="mb-2 text-xs text-ink-soft">
            Training: the fit on all patches. Leave-one-out: each patch predicted by a fit to the others, which is what a colour the card does not hold can expect. Swatches: as the camera saw the patch, after the profile, and the card&apos;s known value{p.fitSamples?.length ? "" : " (none here: this profile keeps no sampled card photo; they appear after a fit from a photo)"}.
          </p>
          <div className="overflow-x-auto">
            <table className="w-full text-sm" data-testid="residuals">
              <thead className="text-left text-ink-soft">
                <tr>
                  <th>Patch</th>
                  <th>Before / after / known</th>
                  <th className="text-right">training</th>
                  <th className="text-right">leave-one-out</th>
                </tr>
              </thead>
              <tbody>
                {p.residuals.map((r) => {
                  const sample = p.fitSamples?.find((s) => s.patch === r.patch);
                  const known = targetLab(r.patch);
                  return (
                    <tr key={r.patch} className="border-t border-line">
                      <td>
                        {r.patch}
                        {onHull.has(r.patch) && <span className="ml-1 text-xs text-ink-soft">(hull)</span>}
                      </td>
                      <td>
                        {sample && fitted ? (
                          <span className="flex gap-1">
                            <span role="img" aria-label={`${r.patch} as photographed`} className="h-6 w-6 rounded border border-black/10" style={{ backgroundColor: linearSrgbToHex(sample.rawLinearRgb) }} />
                            <span role="img" aria-label={`${r.patch} after the profile`} className="h-6 w-6 rounded border border-black/10" style={{ backgroundColor: labToHex(profileColour(p, sample.rawLinearRgb).lab, "D65") }} />
                            {known && <span role="img" aria-label={`${r.patch} known value`} className="h-6 w-6 rounded border border-black/10" style={{ backgroundColor: labToHex(known, "D65") }} />}
                          </span>
                        ) : (
                          "—"
                        )}
                      </td>
                      <td className="text-right tabular-nums">{r.deltaE00.toFixed(2)}</td>
                      <td className="text-right tabular-nums">{r.looDeltaE00 === undefined ? "—" : r.looDeltaE00.toFixed(2)}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </Card>
      )}

      {tried.methods.length > 0 && (
        <Card title="Methods tried (ΔE00, CIEDE2000)" className="mt-4">
          <p className="mb-2 text-xs text-ink-soft">
            Hull: the leave-one-out mean over the patches at the edge of the card&apos;s colours as the camera sees them, and the lightest and darkest grey ({tried.hullPatches.length} patches, marked above); each is then predicted beyond the others, as a dye more saturated than any patch would be.
          </p>
          <div className="overflow-x-auto">
            <table className="w-full text-sm" data-testid="methods-tried">
              <thead className="text-left text-ink-soft">
                <tr>
                  <th>Method</th>
                  <th className="text-right">training mean</th>
                  <th className="text-right">leave-one-out mean / worst</th>
                  <th className="text-right">hull leave-one-out mean</th>
                </tr>
              </thead>
              <tbody>
                {tried.methods.map((m) => (
                  <tr key={m.method} className="border-t border-line">
                    <td>
                      {methodName(m.method)}
                      {m.method === (p.calibration as { method?: string } | null)?.method && <span className="ml-1 text-xs text-ink-soft">(used)</span>}
                    </td>
                    {m.refusal ? (
                      <td colSpan={3} className="text-ink-soft">
                        not fitted: {m.refusal}
                      </td>
                    ) : (
                      <>
                        <td className="text-right tabular-nums">{f2(m.meanDeltaE00)}</td>
                        <td className="text-right tabular-nums">
                          {f2(m.meanLooDeltaE00)} / {f2(m.maxLooDeltaE00)}
                        </td>
                        <td className="text-right tabular-nums">{m.meanHullLooDeltaE00 === undefined ? "— (fitted before this figure existed)" : f2(m.meanHullLooDeltaE00)}</td>
                      </>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {tried.selection && <p className="mt-2 text-xs" data-testid="method-selection">{tried.selection}</p>}
        </Card>
      )}

      {isAdmin && p.state === "draft" && (
        <>
          <Card title="Fit from a card photo" className="mt-4">
            {target?.gridRows && target.gridColumns ? (
              <CardFit
                profileId={p.id}
                rows={target.gridRows}
                columns={target.gridColumns}
                photo={null}
                corners={(p.fitGrid as GridCorners | null) ?? null}
              />
            ) : (
              <p className="text-sm">Choose a calibration target with a layout (rows × columns) for this draft first.</p>
            )}
          </Card>
          <Card title="Approve" className="mt-4">
            <ActionButton action={approveProfileAction} fields={{ id: p.id }} label="Approve this profile" variant="primary">
              <div className="grid max-w-md grid-cols-2 gap-3">
                <Field label="Tolerance: mean (ΔE00, leave-one-out)" name="toleranceMean">
                  <TextInput name="toleranceMean" defaultValue={String(DEFAULT_TOLERANCE.meanDeltaE00)} inputMode="decimal" />
                </Field>
                <Field label="Tolerance: worst patch (ΔE00)" name="toleranceMax">
                  <TextInput name="toleranceMax" defaultValue={String(DEFAULT_TOLERANCE.maxDeltaE00)} inputMode="decimal" />
                </Field>
              </div>
              <p className="text-xs text-ink-soft">Defaults mean 2 and worst 4 ΔE00 are common practice, not a published standard.</p>
            </ActionButton>
          </Card>
          <Card title="Edit draft" className="mt-4">
            <ProfileForm
              targets={listCalibrationTargets(handle).map((t) => ({ id: t.id, name: t.name }))}
              values={{
                id: p.id,
                name: p.name,
                illuminant: p.illuminant,
                lightSource: p.lightSource,
                colourTemperatureK: p.colourTemperatureK,
                camera: p.camera,
                cameraSettings: p.cameraSettings,
                targetId: p.targetId,
                method: p.method ?? "auto",
                validFrom: day(p.validFrom),
                validUntil: day(p.validUntil),
                notes: p.notes,
              }}
            />
          </Card>
        </>
      )}

      {isAdmin && p.state !== "retired" && (
        <Card title="Change state" className="mt-4">
          <div className="flex flex-wrap gap-4">
            {p.state === "approved" && <ActionButton action={reopenProfileAction} fields={{ id: p.id }} label="Reopen as draft to re-fit" />}
            <ActionButton action={retireProfileAction} fields={{ id: p.id }} label="Retire this profile" variant="danger" />
          </div>
        </Card>
      )}

      {preview && (
        <Card title="Re-derive measurements" className="mt-4">
          <p className="text-sm" data-testid="rederive-preview">
            {preview.total} measurement{preview.total === 1 ? "" : "s"} name this profile; re-deriving them from their raw linear RGB with the current calibration would change{" "}
            <strong>{preview.summary.changed}</strong>
            {preview.summary.changed > 0 && (
              <>
                {" "}(median {preview.summary.median.toFixed(2)}, 95th percentile {preview.summary.p95.toFixed(2)}, largest {preview.summary.max.toFixed(2)} ΔE00)
              </>
            )}
            .
          </p>
          {preview.summary.changed > 0 && (
            <>
              <ul className="my-2 text-xs tabular-nums">
                {preview.summary.bins.map((b) => (
                  <li key={b.from}>
                    {b.from}–{Number.isFinite(b.to) ? b.to : "∞"} ΔE00: {b.count}
                  </li>
                ))}
              </ul>
              <ActionButton action={rederiveAction} fields={{ id: p.id, expected: String(preview.summary.changed) }} label={`Re-derive ${preview.summary.changed} measurements`} variant="primary" />
            </>
          )}
        </Card>
      )}

      <div className="mt-4 grid gap-4 lg:grid-cols-2">
        <Card title="Check standards through this profile">
          <HistoryChart
            label="ΔE00 between each check standard as measured and its spectrophotometer value, over time"
            points={checks.map((c) => ({ at: day(c.reading.createdAt), deltaE00: c.reading.deltaE00, name: c.standard }))}
          />
          {checks.length > 0 && (
            <table className="mt-2 w-full text-xs">
              <tbody>
                {checks.map((c) => (
                  <tr key={c.reading.id}>
                    <td>{day(c.reading.createdAt)}</td>
                    <td>
                      {c.standard}
                      {c.standardRetiredAt ? <span className="text-ink-soft"> (retired {day(c.standardRetiredAt)})</span> : null}
                    </td>
                    <td className="text-right tabular-nums">{c.reading.deltaE00.toFixed(2)} ΔE00</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Card>
        <Card title="Drift of in-photo references">
          <HistoryChart
            label={`ΔE00 between references seen through the profile and their known values; dashed line: drift limit ${DRIFT_LIMIT_DE00} ΔE00 (common practice, no source)`}
            limit={DRIFT_LIMIT_DE00}
            points={drift.map((d) => ({ at: day(d.createdAt), deltaE00: d.deltaE00, name: d.label }))}
          />
          {drift.length > 0 && (
            <table className="mt-2 w-full text-xs">
              <tbody>
                {drift.map((d) => (
                  <tr key={d.id}>
                    <td>{day(d.createdAt)}</td>
                    <td>{d.label || "reference"}</td>
                    <td className="text-right tabular-nums">
                      {d.deltaE00.toFixed(2)} ΔE00 {d.flagged ? "— above the limit" : ""}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Card>
      </div>
    </>
  );
}
