import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { listShortlists } from "@/db/queries/shortlists";
import { PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Shortlists" };

export default async function ShortlistsPage() {
  await pageAccess(ANY_ROLE);
  const lists = listShortlists(db());
  return (
    <>
      <PageHeader title="Shortlists" lead="Candidate dyes kept for a formulation, with notes. Everyone in the lab can read them." />
      {lists.length === 0 ? (
        <p className="rounded-xl border border-line bg-white p-6 text-sm">No shortlists yet.</p>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2">
          {lists.map(({ list, owner, items }) => (
            <li key={list.id}>
              <Link href={`/shortlists/${list.id}`} className="block rounded-xl border border-line bg-white p-4 hover:border-accent">
                <p className="font-semibold">{list.name}</p>
                <p className="text-sm text-ink-soft">
                  {items} dyes · kept by {owner}
                </p>
                {list.notes && <p className="mt-2 text-sm">{list.notes}</p>}
              </Link>
            </li>
          ))}
        </ul>
      )}
    </>
  );
}
