import type { Metadata } from "next";
import { db } from "@/db/client";
import { listRecentPhotos } from "@/db/queries/bench";
import { Card, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Bench" };

export default async function BenchPage() {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="The bench" />;
  const handle = db();
  const photos = listRecentPhotos(handle, { limit: 40 });
  return (
    <>
      <PageHeader title="Bench" lead="Rack photos of the lab, newest first, with the lighting profile each was corrected with and how many vials were measured in it." />
      <div className="mb-4">
        <SafetyNotice />
      </div>
      <Card title={`Rack photos (${photos.length} most recent)`}>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="text-xs uppercase text-ink-soft">
              <tr>
                <th className="py-2 pr-3">File</th>
                <th className="py-2 pr-3">Taken</th>
                <th className="py-2 pr-3">Lighting profile</th>
                <th className="py-2 pr-3">By</th>
                <th className="py-2 pr-3 text-right">Vials</th>
                <th className="py-2 pr-3 text-right">Size</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-line">
              {photos.map(({ photo, uploader, profile, count }) => (
                <tr key={photo.id}>
                  <td className="py-2 pr-3 font-mono text-xs">{photo.originalName}</td>
                  <td className="py-2 pr-3">{photo.takenAt?.toISOString().slice(0, 16).replace("T", " ") ?? "—"}</td>
                  <td className="py-2 pr-3">{profile ?? "none"}</td>
                  <td className="py-2 pr-3">{uploader}</td>
                  <td className="py-2 pr-3 text-right tabular-nums">{count}</td>
                  <td className="py-2 pr-3 text-right tabular-nums">
                    {photo.width}×{photo.height}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </Card>
    </>
  );
}
