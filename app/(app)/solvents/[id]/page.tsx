import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { db } from "@/db/client";
import { findSolvent } from "@/db/queries/solvents";
import { SolventEditForm } from "@/components/solvents/solvent-edit-form";
import { Card, PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Edit solvent" };

export default async function SolventEditPage({ params }: { params: Promise<{ id: string }> }) {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="Editing the solvent table" />;
  const solvent = findSolvent(db(), { id: (await params).id });
  if (!solvent) notFound();
  return (
    <>
      <PageHeader
        title={`Edit ${solvent.name}`}
        lead="Every value needs its published source. ETN is recomputed from ET(30). Fits made after the change use the new values; the old ones stay in the audit log."
        actions={
          <Link href="/solvents" className="min-h-11 rounded-lg border border-line bg-white px-4 py-2.5 text-sm font-semibold">
            Back to the table
          </Link>
        }
      />
      <Card>
        <SolventEditForm solvent={solvent} />
      </Card>
    </>
  );
}
