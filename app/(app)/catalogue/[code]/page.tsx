import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { dyeMeasurements, findDyeByCode } from "@/db/queries/dyes";
import { inArray } from "drizzle-orm";
import { AbPlane, type PlanePoint } from "@/components/catalogue/ab-plane";
import { TitrationSection } from "@/components/acid-base/titration-section";
import { SpectraSection } from "@/components/spectra/spectra-section";
import { SpectrumUpload } from "@/components/spectra/spectrum-upload";
import { DyeEditForm } from "@/components/catalogue/dye-edit-form";
import { ReplicateGroups } from "@/components/bench/replicate-groups";
import { AddToShortlistForm, CreateShortlistForm } from "@/components/shortlists/shortlist-forms";
import { ButtonLink } from "@/components/ui/button";
import { listShortlists } from "@/db/queries/shortlists";
import { lightingProfiles, photos } from "@/db/schema";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { UncertaintyText } from "@/components/lighting/uncertainty";
import { Swatch, SwatchKey } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE, BENCH_ROLES, hasRole } from "@/lib/auth/roles";
import { labToLch } from "@/lib/color/lab";
import type { Lab } from "@/lib/color/types";
import { MEDIUM_LABELS, type MediumClass } from "@/lib/solvents/parameters";
import { count } from "@/lib/text/count";
import { DyeModelSection } from "@/components/models/dye-model-section";
import { ensureDyeModel } from "@/db/queries/models";
import { listSolvents } from "@/db/queries/solvents";

const SCALES = {
  et30: { label: "ET(30)", unit: "kcal/mol", pick: (s: { et30: number | null }) => s.et30 },
  alpha: { label: "Kamlet–Taft α", unit: "", pick: (s: { ktAlpha: number | null }) => s.ktAlpha },
  pistar: { label: "Kamlet–Taft π*", unit: "", pick: (s: { ktPiStar: number | null }) => s.ktPiStar },
  beta: { label: "Kamlet–Taft β", unit: "", pick: (s: { ktBeta: number | null }) => s.ktBeta },
  permittivity: { label: "permittivity εr", unit: "", pick: (s: { permittivity: number | null }) => s.permittivity },
} as const;
type ScaleKey = keyof typeof SCALES;

export async function generateMetadata({ params }: { params: Promise<{ code: string }> }): Promise<Metadata> {
  return { title: decodeURIComponent((await params).code) };
}

export default async function DyePage({ params, searchParams }: { params: Promise<{ code: string }>; searchParams: Promise<{ scale?: string }> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const { code } = await params;
  const { scale: scaleParam } = await searchParams;
  const scale: ScaleKey = scaleParam && scaleParam in SCALES ? (scaleParam as ScaleKey) : "et30";
  const handle = db();
  const dye = findDyeByCode(handle, { code: decodeURIComponent(code) });
  if (!dye) notFound();
  const rows = dyeMeasurements(handle, { dyeId: dye.id });
  const accepted = rows.filter((r) => r.m.reviewState === "accepted");
  const counts = { accepted: accepted.length, pending: rows.filter((r) => r.m.reviewState === "pending").length, rejected: rows.filter((r) => r.m.reviewState === "rejected").length };

  // Mean accepted colour per solvent in neutral conditions, for the strip.
  const neutral = new Map<string, { solvent: (typeof rows)[number]["solvent"]; labs: Lab[] }>();
  for (const r of accepted) {
    if (r.condition.acidBase !== "neutral") continue;
    const entry = neutral.get(r.solvent.id) ?? { solvent: r.solvent, labs: [] };
    entry.labs.push([r.m.l, r.m.a, r.m.b]);
    neutral.set(r.solvent.id, entry);
  }
  const mean = (labs: Lab[]): Lab => [0, 1, 2].map((k) => labs.reduce((s, l) => s + l[k], 0) / labs.length) as Lab;
  const byMedium = (["protic", "dipolar-aprotic", "nonpolar"] as MediumClass[]).map((medium) => ({
    medium,
    items: [...neutral.values()]
      .filter((e) => e.solvent.medium === medium)
      .map((e) => ({ solvent: e.solvent, lab: mean(e.labs), value: SCALES[scale].pick(e.solvent) }))
      .sort((x, y) => (x.value ?? Infinity) - (y.value ?? Infinity)),
  }));
  const acidBase = (["acid", "neutral", "base"] as const).map((state) => {
    const labs = accepted.filter((r) => r.condition.acidBase === state && r.solvent.name === "Water").map((r) => [r.m.l, r.m.a, r.m.b] as Lab);
    return { state, lab: labs.length ? mean(labs) : null, n: labs.length };
  });
  const photoIds = [...new Set(rows.map((r) => r.m.photoId).filter((v): v is string => Boolean(v)))];
  const photoRows = photoIds.length
    ? handle
        .select({ id: photos.id, name: photos.originalName, takenAt: photos.takenAt, createdAt: photos.createdAt, profile: lightingProfiles.name })
        .from(photos)
        .leftJoin(lightingProfiles, eq(photos.lightingProfileId, lightingProfiles.id))
        .where(inArray(photos.id, photoIds))
        .all()
        .sort((x, y) => (y.takenAt ?? y.createdAt).getTime() - (x.takenAt ?? x.createdAt).getTime())
    : [];
  const perPhoto = new Map<string, number>();
  for (const r of rows) if (r.m.photoId) perPhoto.set(r.m.photoId, (perPhoto.get(r.m.photoId) ?? 0) + 1);

  // One point per condition (solvent × acid/base × pH): the mean of its accepted colours.
  const byCondition = new Map<string, { label: string; medium: MediumClass; acidBase: "acid" | "neutral" | "base"; labs: Lab[] }>();
  for (const r of accepted) {
    const key = r.condition.id;
    const entry = byCondition.get(key) ?? { label: `${r.solvent.name}, ${r.condition.acidBase}${r.condition.ph !== null ? ` pH ${r.condition.ph}` : ""}`, medium: r.solvent.medium, acidBase: r.condition.acidBase, labs: [] };
    entry.labs.push([r.m.l, r.m.a, r.m.b]);
    byCondition.set(key, entry);
  }
  const planePoints: PlanePoint[] = [...byCondition.values()].map((e) => ({ lab: mean(e.labs), label: e.label, medium: e.medium, acidBase: e.acidBase }));
  const solventList = listSolvents(handle);
  const myLists = listShortlists(handle, { ownerId: user.id }).map(({ list }) => ({ id: list.id, name: list.name }));

  return (
    <>
      <PageHeader
        title={`${dye.name}`}
        lead={
          <>
            <span className="font-mono">{dye.code}</span> · {dye.dyeClass}
            {dye.molarMass ? ` · ${dye.molarMass} g/mol` : ""}
            {dye.casNumber ? ` · CAS ${dye.casNumber}` : ""}
          </>
        }
      />
      <div className="grid gap-4 lg:grid-cols-3">
        <Card title="Identity" className="lg:col-span-1">
          <dl className="space-y-2 text-sm">
            <div>
              <dt className="text-ink-soft">Synonyms</dt>
              <dd>{dye.synonyms.join(", ") || "—"}</dd>
            </div>
            <div>
              <dt className="text-ink-soft">Hazards</dt>
              <dd>{dye.hazards || "—"}</dd>
            </div>
            <div>
              <dt className="text-ink-soft">Notes</dt>
              <dd>{dye.notes || "—"}</dd>
            </div>
            <div>
              <dt className="text-ink-soft">Measurements</dt>
              <dd className="flex gap-2">
                <Badge tone="ok">{counts.accepted} accepted</Badge>
                <Badge tone="warn">{counts.pending} pending</Badge>
                <Badge tone="bad">{counts.rejected} rejected</Badge>
              </dd>
            </div>
            <div>
              <dt className="text-ink-soft">Photos</dt>
              <dd>{photoIds.length} rack photos (listed below)</dd>
            </div>
          </dl>
        </Card>
        <Card
          title="Colour across the solvent panel"
          className="lg:col-span-2"
          actions={
            <nav aria-label="Order by" className="flex flex-wrap gap-1 text-xs">
              {(Object.keys(SCALES) as ScaleKey[]).map((k) => (
                <Link
                  key={k}
                  href={`?scale=${k}`}
                  aria-current={k === scale ? "true" : undefined}
                  className={`rounded-full border px-3 py-1.5 ${k === scale ? "border-accent bg-accent-soft text-accent" : "border-line"}`}
                >
                  {SCALES[k].label}
                </Link>
              ))}
            </nav>
          }
        >
          <p className="mb-3 text-xs text-ink-soft">Neutral conditions, mean of accepted measurements, ordered by {SCALES[scale].label} within each medium class.</p>
          <SwatchKey className="mb-3" />
          <div className="space-y-4">
            {byMedium.map(({ medium, items }) => (
              <div key={medium}>
                <h3 className="mb-1 text-sm font-semibold">{MEDIUM_LABELS[medium]}</h3>
                {items.length === 0 ? (
                  <p className="text-xs text-ink-soft">Not measured in this class yet.</p>
                ) : (
                  <ul className="flex flex-wrap gap-2">
                    {items.map((it) => (
                      <li key={it.solvent.id} className="flex w-24 flex-col items-center text-center text-[11px] leading-tight">
                        <Swatch lab={it.lab} size="lg" label={it.solvent.name} />
                        <span className="mt-1 font-medium">{it.solvent.name}</span>
                        <span className="text-ink-soft">{it.value === null ? "no value" : `${it.value}${SCALES[scale].unit ? ` ${SCALES[scale].unit}` : ""}`}</span>
                      </li>
                    ))}
                  </ul>
                )}
              </div>
            ))}
          </div>
        </Card>
        <DyeModelSection model={ensureDyeModel(handle, { dyeId: dye.id })} solvents={solventList} dyeCode={dye.code} />
        <Card title="a*b* plane, one point per condition" className="lg:col-span-1">
          {planePoints.length ? <AbPlane points={planePoints} /> : <p className="text-sm text-ink-soft">No accepted colours yet.</p>}
        </Card>
        <Card title="Shortlist and compare" className="lg:col-span-2">
          <div className="grid gap-6 md:grid-cols-2">
            {myLists.length > 0 ? <AddToShortlistForm dyeId={dye.id} lists={myLists} /> : <p className="text-sm text-ink-soft">You keep no shortlists yet; start one here.</p>}
            <CreateShortlistForm dyeId={dye.id} />
          </div>
          <div className="mt-4">
            <ButtonLink href={`/compare?dyes=${encodeURIComponent(dye.code)}`}>Compare with other dyes</ButtonLink>
          </div>
        </Card>
        <Card title="Acid, neutral and base (water)">
          <ul className="flex gap-4">
            {acidBase.map((ab) => (
              <li key={ab.state} className="flex flex-col items-center text-xs">
                {ab.lab ? <Swatch lab={ab.lab} size="lg" label={ab.state} /> : <span className="swatch-checker inline-block h-16 w-16 rounded-md" />}
                <span className="mt-1 font-medium">{ab.state}</span>
                <span className="text-ink-soft">{ab.n ? `${ab.n} measured` : "not measured"}</span>
              </li>
            ))}
          </ul>
        </Card>
        <TitrationSection db={handle} dyeId={dye.id} canEdit={hasRole(user.role, BENCH_ROLES)} />
        <SpectraSection db={handle} dyeId={dye.id} />
        {hasRole(user.role, BENCH_ROLES) && (
          <Card title="Add an absorption spectrum" className="lg:col-span-3">
            <SpectrumUpload dyeCode={dye.code} solvents={solventList.map((s) => ({ id: s.id, name: s.name }))} />
          </Card>
        )}
        <ReplicateGroups rows={accepted} />
        <Card title="Measurements" className="lg:col-span-2">
          <div className="max-h-96 overflow-auto overscroll-contain">
            <table className="w-full text-left text-sm">
              <thead className="sticky top-0 bg-white text-xs text-ink-soft">
                <tr>
                  <th className="py-2 pr-2"> </th>
                  <th className="py-2 pr-2">Solvent</th>
                  <th className="py-2 pr-2">Condition</th>
                  <th className="py-2 pr-2 text-right">L*</th>
                  <th className="py-2 pr-2 text-right">C*ab</th>
                  <th className="py-2 pr-2 text-right">hab (°)</th>
                  <th className="py-2 pr-2 text-right">± ΔE00</th>
                  <th className="py-2 pr-2">State</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line">
                {rows.map(({ m, solvent, condition }) => {
                  const lch = labToLch([m.l, m.a, m.b]);
                  return (
                    <tr key={m.id}>
                      <td className="py-1.5 pr-2">
                        <Swatch lab={[m.l, m.a, m.b]} size="sm" />
                      </td>
                      <td className="py-1.5 pr-2">{solvent.name}</td>
                      <td className="py-1.5 pr-2 text-ink-soft">
                        {condition.acidBase}
                        {condition.ph !== null ? `, pH ${condition.ph}` : ""}
                      </td>
                      <td className="py-1.5 pr-2 text-right tabular-nums">{lch[0].toFixed(1)}</td>
                      <td className="py-1.5 pr-2 text-right tabular-nums">{lch[1].toFixed(1)}</td>
                      <td className="py-1.5 pr-2 text-right tabular-nums">{lch[2].toFixed(0)}</td>
                      <td className="py-1.5 pr-2 text-right tabular-nums">
                        <UncertaintyText value={m.uDeltaE00} />
                      </td>
                      <td className="py-1.5 pr-2">
                        <Badge tone={m.reviewState === "accepted" ? "ok" : m.reviewState === "pending" ? "warn" : "bad"}>{m.reviewState}</Badge>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </Card>
        <Card title={`Photos it was measured in (${photoRows.length})`} className="lg:col-span-3">
          {photoRows.length === 0 ? (
            <p className="text-sm text-ink-soft">No rack photos: these colours were entered without a photo.</p>
          ) : (
            <ul className="grid gap-2 text-sm sm:grid-cols-2 lg:grid-cols-3">
              {photoRows.map((p) => (
                <li key={p.id}>
                  <Link href={hasRole(user.role, BENCH_ROLES) ? `/bench/photos/${p.id}` : `/measurements?photoId=${encodeURIComponent(p.id)}`} className="block h-full border border-line p-2 hover:border-ink">
                    <span className="block break-all font-medium underline">{p.name || p.id}</span>
                    <span className="block text-ink-soft">
                      {(p.takenAt ?? p.createdAt).toISOString().slice(0, 10)} · {p.profile ?? "no lighting profile"} · {count(perPhoto.get(p.id) ?? 0, "vial")} of this dye
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </Card>
        {hasRole(user.role, BENCH_ROLES) && (
          <Card title="Edit dye" className="lg:col-span-3">
            <DyeEditForm dye={dye} />
          </Card>
        )}
      </div>
    </>
  );
}
