import type { Metadata } from "next";
import { SolventCreateForm } from "@/components/solvents/solvent-create-form";
import { Card, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Add a solvent" };

export default async function NewSolventPage() {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="Adding solvents" />;
  return (
    <>
      <PageHeader title="Add a solvent" lead="Admins add solvents with their published parameters; every value needs its source. ETN is derived from ET(30). The addition is kept in the audit log." />
      <div className="space-y-4">
        <SafetyNotice />
        <Card>
          <SolventCreateForm />
        </Card>
      </div>
    </>
  );
}
