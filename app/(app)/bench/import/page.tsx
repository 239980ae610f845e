import type { Metadata } from "next";
import { CsvImport } from "@/components/imports/csv-import";
import { PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Import from CSV" };

export default async function ImportPage() {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="Imports" />;
  return (
    <>
      <PageHeader
        title="Import from CSV"
        lead="Dyes for the catalogue, or colours measured with an instrument. Every row is checked first and every problem is named by line and column; nothing is stored unless the whole file is good, or you choose to import only its good rows."
      />
      <CsvImport />
    </>
  );
}
