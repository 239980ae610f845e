import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { db } from "@/db/client";
import { listCalibrationTargets, listRackTemplates, listSolventPanels, photoMeasurements } from "@/db/queries/bench";
import { listDyes } from "@/db/queries/dyes";
import { benchCheckStandards, benchProfiles, getProfile } from "@/db/queries/lighting";
import { benchRefusal } from "@/lib/lighting/status";
import { labD50ToLabD65 } from "@/lib/color/convert";
import { getPhoto } from "@/db/queries/photos";
import { listSolvents } from "@/db/queries/solvents";
import { MarkingEditor } from "@/components/bench/marking-editor";
import { PhotoFileMissing } from "@/components/bench/photo-file-missing";
import { objectStore } from "@/lib/storage";
import { SavedMarking } from "@/components/bench/saved-marking";
import { FlagBadges } from "@/components/bench/flag-badges";
import { Badge, Card, Notice, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { labToLch } from "@/lib/color/lab";

export const metadata: Metadata = { title: "Mark vials" };

export default async function MarkPhotoPage({ params }: { params: Promise<{ id: string }> }) {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="The bench" />;
  const { id } = await params;
  const handle = db();
  const photo = getPhoto(handle, id);
  if (!photo) notFound();
  // Only approved profiles inside their validity window can be chosen (the server refuses the others too).
  const profiles = benchProfiles(handle).map((p) => ({ ...p, approved: true, validNow: true }));
  // A photo uploaded under a profile that has since expired or been retired starts with no profile (the
  // save would refuse it), and the chemist is told why.
  const storedProfileOffered = !photo.lightingProfileId || profiles.some((p) => p.id === photo.lightingProfileId);
  const storedProfile = storedProfileOffered ? undefined : getProfile(handle, photo.lightingProfileId!);
  // The editor works in D65; a D50 card's values are Bradford-adapted here, never read as D65.
  const patches = listCalibrationTargets(handle).flatMap((t) =>
    t.patches.map((p) => {
      const lab = t.whitePoint === "D50" ? labD50ToLabD65(p.lab) : p.lab;
      return { label: `${t.name}: ${p.name} (L* ${lab[0].toFixed(2)}, a* ${lab[1].toFixed(2)}, b* ${lab[2].toFixed(2)}, D65${t.whitePoint === "D50" ? ", adapted from D50" : ""})`, lab };
    }),
  );
  const dyes = listDyes(handle).map((d) => ({ id: d.id, code: d.code, name: d.name, synonyms: d.synonyms, dyeClass: d.dyeClass }));
  const solvents = listSolvents(handle).map((s) => ({ id: s.id, name: s.name, medium: s.medium, cautions: s.cautions }));
  const templates = listRackTemplates(handle).map((t) => ({ id: t.id, name: t.name, regions: t.regions }));
  const panels = listSolventPanels(handle).map((p) => ({ id: p.id, name: p.name, entries: p.entries }));
  const checkStandards = benchCheckStandards(handle).map((c) => ({ id: c.id, name: c.name, kind: c.kind, lab: [c.l, c.a, c.b] as [number, number, number], whitePoint: c.whitePoint === "D50" ? ("D50" as const) : ("D65" as const) }));
  const existing = photoMeasurements(handle, { photoId: photo.id });
  const fileMissing = !(await objectStore().has(photo.storageKey));
  return (
    <>
      <PageHeader
        title={`Mark vials: ${photo.originalName || photo.id}`}
        lead="Draw one region inside each vial (clear of the meniscus, labels and glare) and one on the white or grey reference. Give every vial its dye, solvent and condition. The colour of each region is measured live on the stored photo; saving measures it again and sends it for review."
        actions={
          <Link href="/bench" className="inline-flex min-h-11 items-center rounded-lg border border-line px-4 text-sm font-semibold">
            Back to the bench
          </Link>
        }
      />
      {fileMissing ? (
        <PhotoFileMissing name={photo.originalName || photo.id} />
      ) : (
      <>
      {storedProfile && (
        <div className="mb-4" data-testid="stored-profile-gone">
          <Notice tone="caution" title="Choose the light correction again">
            This photo was uploaded with a profile that can no longer correct new measurements. {benchRefusal(storedProfile)} The list below offers the current ones; a white or grey reference of known CIELAB marked in the photo also corrects the light.
          </Notice>
        </div>
      )}
      <MarkingEditor
        photo={{ id: photo.id, width: photo.width, height: photo.height, name: photo.originalName, lightingProfileId: storedProfileOffered ? photo.lightingProfileId : null }}
        displayUrl={`/api/photos/${photo.id}/image?size=display`}
        dyes={dyes}
        solvents={solvents}
        profiles={profiles}
        templates={templates}
        patches={patches}
        panels={panels}
        checkStandards={checkStandards}
      />
      </>
      )}
      <Card title={`Measured in this photo (${existing.length})`} className="mt-6">
        {existing.length === 0 ? (
          <p className="text-sm text-ink-soft">Nothing saved from this photo yet.</p>
        ) : (
          <div className="grid gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
          <SavedMarking
            photo={{ id: photo.id, width: photo.width, height: photo.height, name: photo.originalName || photo.id }}
            regions={existing.filter(({ m }) => m.region).map(({ m }, i) => ({ id: m.id, label: String(i + 1), region: m.region!, state: m.reviewState, flagged: m.flags.length > 0 }))}
          />
          <ol className="divide-y divide-line" data-testid="saved-measurements">
            {existing.map(({ m, dye, solvent, condition, author }, i) => {
              const lch = labToLch([m.l, m.a, m.b]);
              return (
                <li key={m.id} className="flex flex-wrap items-center gap-3 py-2 text-sm">
                  <span className="rounded bg-ink px-1.5 text-xs font-semibold text-white">{i + 1}</span>
                  <Swatch lab={[m.l, m.a, m.b]} />
                  <span className="font-semibold">
                    {dye.code} · {dye.name}
                  </span>
                  <span>
                    {solvent}, {condition.acidBase}
                    {condition.ph !== null ? `, pH ${condition.ph}` : ""}
                  </span>
                  <span className="tabular-nums text-ink-soft">
                    L* {m.l.toFixed(1)} a* {m.a.toFixed(1)} b* {m.b.toFixed(1)} · C* {lch[1].toFixed(1)} h° {lch[2].toFixed(0)} ·{" "}
                    <span data-testid="saved-uncertainty">{m.uDeltaE00 !== null ? `± ${m.uDeltaE00.toFixed(2)} ΔE00` : "± —"}</span>
                  </span>
                  <Badge tone={m.reviewState === "accepted" ? "ok" : m.reviewState === "rejected" ? "bad" : "neutral"}>{m.reviewState}</Badge>
                  <span className="text-ink-soft">by {author}</span>
                  <FlagBadges flags={m.flags} />
                </li>
              );
            })}
          </ol>
          </div>
        )}
      </Card>
    </>
  );
}
