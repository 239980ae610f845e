import type { Metadata } from "next";
import { DyeCreateForm } from "@/components/catalogue/dye-create-form";
import { Card, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Add a dye" };

export default async function NewDyePage({ searchParams }: { searchParams: Promise<{ name?: string }> }) {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="Adding dyes" />;
  const { name = "" } = await searchParams;
  return (
    <>
      <PageHeader title="Add a dye" lead="A new dye for the catalogue. Chemists and admins can add dyes; the addition is kept in the audit log. Its colours come from the bench afterwards." />
      <div className="space-y-4">
        <SafetyNotice />
        <Card>
          <DyeCreateForm initialName={name.slice(0, 200)} />
        </Card>
      </div>
    </>
  );
}
