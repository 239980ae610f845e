import type { Metadata } from "next";
import { db } from "@/db/client";
import { listDyes } from "@/db/queries/dyes";
import { listSolvents } from "@/db/queries/solvents";
import { SeriesImport } from "@/components/acid-base/series-import";
import { PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Import a pH series" };

export default async function ImportPhSeriesPage() {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="Importing pH series" />;
  const handle = db();
  return (
    <>
      <PageHeader
        title="Import a pH series from CSV"
        lead="One vial per row, measured with an instrument. Every row is checked and every problem is named by line and column; nothing is stored unless the whole file is good."
      />
      <SeriesImport dyes={listDyes(handle).map((d) => ({ id: d.id, label: `${d.code} · ${d.name}` }))} solvents={listSolvents(handle).map((s) => ({ id: s.id, label: s.name }))} />
    </>
  );
}
