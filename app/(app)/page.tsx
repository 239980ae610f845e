import Link from "next/link";
import { db } from "@/db/client";
import { countMeasurements, listRecentPhotos } from "@/db/queries/bench";
import { listDyes } from "@/db/queries/dyes";
import { listSolvents } from "@/db/queries/solvents";
import { Card, PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { count } from "@/lib/text/count";

export default async function OverviewPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const handle = db();
  const dyes = listDyes(handle);
  const solvents = listSolvents(handle);
  const states = Object.fromEntries(countMeasurements(handle).map((s) => [s.state, s.n]));
  const photos = listRecentPhotos(handle, { limit: 5 });
  const bench = user.role !== "formulator";
  // Each tile opens the list it counts.
  const stats = [
    { label: "Dyes in the catalogue", value: dyes.length, href: "/catalogue" },
    { label: "Accepted measurements", value: states.accepted ?? 0, href: "/measurements?state=accepted" },
    { label: "Waiting for review", value: states.pending ?? 0, href: bench ? "/review" : "/measurements?state=pending" },
    { label: "Solvents with parameters", value: solvents.length, href: "/solvents" },
  ];
  return (
    <>
      <PageHeader title={`Hello, ${user.name.split(" ")[0]}`} lead="Calibrated CIELAB records of every dye across the solvent panel and acid/base conditions." />
      <ul className="grid grid-cols-2 gap-3 lg:grid-cols-4">
        {stats.map((s) => (
          <li key={s.label}>
            <Link href={s.href} className="group flex h-full flex-col border border-line bg-white p-4 hover:border-ink sm:p-5">
              <span className="text-3xl font-bold tabular-nums">{s.value.toLocaleString("en")}</span>
              <span className="mt-1 text-sm text-ink-soft group-hover:underline">{s.label} →</span>
            </Link>
          </li>
        ))}
      </ul>
      <div className="mt-6 grid gap-4 lg:grid-cols-2">
        <Card title="Latest rack photos">
          <ul className="divide-y divide-line text-sm">
            {photos.map(({ photo, uploader, profile, count: n }) => (
              <li key={photo.id}>
                <Link href={bench ? `/bench/photos/${photo.id}` : `/measurements?photoId=${encodeURIComponent(photo.id)}`} className="block py-2 hover:bg-paper">
                  <span className="block break-all font-mono text-xs underline">{photo.originalName}</span>
                  <span className="block text-ink-soft">
                    {photo.takenAt?.toISOString().slice(0, 10) ?? "undated"} · {count(n, "vial")} · {profile ?? "no lighting profile"} · {uploader}
                  </span>
                </Link>
              </li>
            ))}
          </ul>
        </Card>
        <Card title="Where to start">
          <ul className="space-y-2 text-sm">
            <li>
              <Link className="font-medium text-accent hover:underline" href="/search">
                Search by colour
              </Link>{" "}
              — the dye that is violet in a dipolar aprotic medium, or shifts most between acid and base.
            </li>
            <li>
              <Link className="font-medium text-accent hover:underline" href="/catalogue">
                Browse the catalogue
              </Link>{" "}
              — each dye&apos;s colour across the solvent panel.
            </li>
            <li>
              <Link className="font-medium text-accent hover:underline" href="/solvents">
                Solvent table
              </Link>{" "}
              — ET(30), Kamlet–Taft α, β, π* and permittivity, each with its source.
            </li>
          </ul>
        </Card>
      </div>
    </>
  );
}
