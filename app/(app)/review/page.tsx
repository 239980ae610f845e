import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { earlierForMeasurements, photoMeasurements, reviewQueue } from "@/db/queries/bench";
import { getPhoto } from "@/db/queries/photos";
import { FlagBadges } from "@/components/bench/flag-badges";
import { SavedMarking } from "@/components/bench/saved-marking";
import { AcceptPhoto } from "@/components/review/accept-photo";
import { ReplicateCompare } from "@/components/review/replicate-compare";
import { ReviewButtons } from "@/components/review/review-buttons";
import { Badge, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { labToLch } from "@/lib/color/lab";

export const metadata: Metadata = { title: "Review" };

/** The marked region, cut from the photo's display copy, so the reviewer sees what was measured. */
function RegionCrop({ photo, region }: { photo: { id: string; width: number; height: number }; region: { shape: "rect" | "ellipse"; x: number; y: number; w: number; h: number } }) {
  const pad = Math.max(region.w, region.h) * 0.35;
  const box = { x: region.x - pad, y: region.y - pad, w: region.w + 2 * pad, h: region.h + 2 * pad };
  return (
    <svg viewBox={`${box.x} ${box.y} ${box.w} ${box.h}`} className="h-24 w-24 shrink-0 rounded-md border border-line bg-[#1b1f27]" role="img" aria-label="The marked region in its photo">
      <image href={`/api/photos/${photo.id}/image?size=display`} x={0} y={0} width={photo.width} height={photo.height} preserveAspectRatio="none" />
      {region.shape === "rect" ? (
        <rect x={region.x} y={region.y} width={region.w} height={region.h} fill="none" stroke="#5eead4" strokeWidth={2} vectorEffect="non-scaling-stroke" />
      ) : (
        <ellipse cx={region.x + region.w / 2} cy={region.y + region.h / 2} rx={region.w / 2} ry={region.h / 2} fill="none" stroke="#5eead4" strokeWidth={2} vectorEffect="non-scaling-stroke" />
      )}
    </svg>
  );
}

export default async function ReviewPage({ searchParams }: { searchParams: Promise<{ photoId?: string }> }) {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="Review" />;
  const { photoId } = await searchParams;
  const handle = db();
  const queue = reviewQueue(handle, { limit: 100, photoId: photoId || undefined });
  const earlier = earlierForMeasurements(handle, queue.map(({ m }) => ({ id: m.id, dyeId: m.dyeId, conditionId: m.conditionId })));
  const photo = photoId ? getPhoto(handle, photoId) : undefined;
  const saved = photo ? photoMeasurements(handle, { photoId: photo.id }) : [];
  const number = new Map(saved.map(({ m }, i) => [m.id, i + 1]));
  return (
    <>
      <PageHeader
        title="Review"
        lead="New measurements wait here until a second person accepts them. Only accepted measurements count in search and in the solvent models. Nobody reviews their own; the author is told of each decision by e-mail."
      />
      <p className="mb-3 text-sm text-ink-soft" data-testid="review-count">
        {queue.total} waiting{photoId ? " from this photo" : ""}
        {queue.total > queue.length ? `; the ${queue.length} oldest are shown` : ""}.{" "}
        {photoId && (
          <Link href="/review" className="font-semibold text-accent underline">
            Show every photo
          </Link>
        )}
      </p>
      {photo && (
        <section className="mb-4 grid gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]" aria-label="The photo with its saved regions">
          <SavedMarking
            photo={{ id: photo.id, width: photo.width, height: photo.height, name: photo.originalName || photo.id }}
            regions={saved.filter(({ m }) => m.region).map(({ m }, i) => ({ id: m.id, label: String(number.get(m.id) ?? i + 1), region: m.region!, state: m.reviewState, flagged: m.flags.length > 0 }))}
          />
          <div className="space-y-2">
            <p className="text-sm">
              {saved.length} measurement{saved.length === 1 ? "" : "s"} saved from this photo; {queue.total} waiting. Compare each numbered region with its card below before accepting.
            </p>
            <AcceptPhoto photoId={photo.id} theirs={queue.filter(({ m }) => m.createdBy !== user.id).length} own={queue.filter(({ m }) => m.createdBy === user.id).length} />
          </div>
        </section>
      )}
      {queue.length === 0 ? (
        <p className="rounded-xl border border-line bg-white p-6 text-sm">Nothing is waiting for review.</p>
      ) : (
        <ul className="space-y-2">
          {queue.map(({ m, dye, solvent, condition, author, photo }) => {
            const lch = labToLch([m.l, m.a, m.b]);
            return (
              <li key={m.id} data-testid="review-item" className="flex flex-wrap items-center gap-4 rounded-xl border border-line bg-white p-3">
                <Swatch lab={[m.l, m.a, m.b]} size="lg" />
                {photo?.id && m.region && <RegionCrop photo={photo} region={m.region} />}
                <div className="min-w-56 flex-1 text-sm">
                  <p className="font-semibold">
                    {number.has(m.id) && <span className="mr-1 rounded bg-ink px-1.5 text-xs text-white">{number.get(m.id)}</span>}
                    {dye.code} · {dye.name}
                  </p>
                  <p className="text-ink-soft">
                    {solvent.name}, {condition.acidBase}
                    {condition.ph !== null ? `, pH ${condition.ph}` : ""}
                    {condition.concentrationUmolL !== null ? `, ${condition.concentrationUmolL} µmol/L` : ""} · L* {lch[0].toFixed(1)} C* {lch[1].toFixed(1)} h° {lch[2].toFixed(0)}
                    {m.uDeltaE00 !== null ? ` ± ${m.uDeltaE00.toFixed(2)} ΔE00` : ""} · by {author}
                    {photo?.id && (
                      <>
                        {" · "}
                        <Link href={`/review?photoId=${photo.id}`} className="text-accent underline">
                          regions on the photo
                        </Link>
                      </>
                    )}
                  </p>
                  <ReplicateCompare lab={[m.l, m.a, m.b]} uncertaintyDeltaE00={m.uDeltaE00} earlier={earlier.get(m.id) ?? []} />
                  {m.flags.length > 0 && (
                    <p className="mt-1 flex flex-wrap gap-1">
                      <FlagBadges flags={m.flags} label={`Quality flags of measurement ${number.get(m.id) ?? ""}`.trim()} />
                      {m.flagReason && <span className="text-xs text-ink-soft">“{m.flagReason}”</span>}
                    </p>
                  )}
                </div>
                <ReviewButtons measurementId={m.id} own={m.createdBy === user.id} />
              </li>
            );
          })}
        </ul>
      )}
    </>
  );
}
