import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { countPhotos, listRecentPhotos } from "@/db/queries/bench";
import { benchProfiles } from "@/db/queries/lighting";
import { AccuracyNotes } from "@/components/lighting/accuracy-notes";
import { PhotoUploader } from "@/components/bench/photo-uploader";
import { Card, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { photoLimits } from "@/lib/storage/limits";

export const metadata: Metadata = { title: "Bench" };

const PAGE_SIZE = 40;

export default async function BenchPage({ searchParams }: { searchParams: Promise<{ page?: string }> }) {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="The bench" />;
  const handle = db();
  const total = countPhotos(handle);
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const requested = Number((await searchParams).page ?? "1");
  const page = Number.isInteger(requested) && requested >= 1 ? Math.min(requested, pages) : 1;
  const photos = listRecentPhotos(handle, { limit: PAGE_SIZE, offset: (page - 1) * PAGE_SIZE });
  // Only approved profiles inside their validity window can be chosen (the server refuses the others too).
  const profiles = benchProfiles(handle);
  return (
    <>
      <PageHeader
        title="Bench"
        lead="Upload rack photos, then mark each vial and the white or grey reference on them. Colours are measured on the stored photo, corrected for the light, and wait for a second person's review."
        actions={
          <Link href="/bench/import" className="inline-flex min-h-11 items-center rounded-lg border border-line px-4 text-sm font-semibold">
            Import from CSV
          </Link>
        }
      />
      <div className="mb-4 grid gap-4 lg:grid-cols-2">
        <SafetyNotice />
        <AccuracyNotes />
      </div>
      <Card title="Upload rack photos" className="mb-4">
        <PhotoUploader maxBytes={photoLimits().maxBytes} profiles={profiles} />
      </Card>
      <Card title={`Rack photos: ${total === 0 ? "none yet" : `${(page - 1) * PAGE_SIZE + 1}–${(page - 1) * PAGE_SIZE + photos.length} of ${total}, newest first`}`}>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="text-xs text-ink-soft">
              <tr>
                <th className="py-2 pr-3">Photo</th>
                <th className="py-2 pr-3">File</th>
                <th className="py-2 pr-3">Taken</th>
                <th className="py-2 pr-3">Lighting profile</th>
                <th className="py-2 pr-3">By</th>
                <th className="py-2 pr-3 text-right">Vials</th>
                <th className="py-2 pr-3 text-right">Size</th>
                <th className="py-2 pr-3" />
              </tr>
            </thead>
            <tbody className="divide-y divide-line">
              {photos.map(({ photo, uploader, profile, count }) => (
                <tr key={photo.id} data-testid="photo-row">
                  <td className="py-2 pr-3">
                    {/* eslint-disable-next-line @next/next/no-img-element */}
                    <img src={`/api/photos/${photo.id}/image?size=thumb`} alt="" width={96} height={Math.round((96 * photo.height) / photo.width)} loading="lazy" className="rounded border border-line" />
                  </td>
                  <td className="break-all py-2 pr-3 font-mono text-xs">{photo.originalName}</td>
                  <td className="py-2 pr-3">{(photo.takenAt ?? photo.createdAt).toISOString().slice(0, 16).replace("T", " ")}</td>
                  <td className="py-2 pr-3">{profile ?? "none yet"}</td>
                  <td className="py-2 pr-3">{uploader}</td>
                  <td className="py-2 pr-3 text-right tabular-nums">{count}</td>
                  <td className="py-2 pr-3 text-right tabular-nums">
                    {photo.width}×{photo.height}
                  </td>
                  <td className="py-2 pr-3">
                    <Link href={`/bench/photos/${photo.id}`} className="inline-flex min-h-11 items-center rounded-md border border-field px-3 font-semibold hover:bg-paper">
                      {count > 0 ? "Open" : "Mark vials"}
                    </Link>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {pages > 1 && (
          <nav aria-label="Pages of rack photos" className="mt-3 flex items-center gap-3 text-sm">
            {page > 1 ? (
              <Link href={`?page=${page - 1}`} rel="prev" className="text-accent">
                ← Newer
              </Link>
            ) : (
              <span className="text-ink-soft">← Newer</span>
            )}
            <span>
              Page {page} of {pages}
            </span>
            {page < pages ? (
              <Link href={`?page=${page + 1}`} rel="next" className="text-accent">
                Older →
              </Link>
            ) : (
              <span className="text-ink-soft">Older →</span>
            )}
          </nav>
        )}
      </Card>
    </>
  );
}
