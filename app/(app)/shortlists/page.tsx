import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { listShortlists } from "@/db/queries/shortlists";
import { CreateShortlistForm } from "@/components/shortlists/shortlist-forms";
import { Card, PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { count } from "@/lib/text/count";

export const metadata: Metadata = { title: "Shortlists" };

export default async function ShortlistsPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const lists = listShortlists(db());
  const mine = lists.filter((l) => l.list.ownerId === user.id);
  const others = lists.filter((l) => l.list.ownerId !== user.id);
  const Grid = ({ items }: { items: typeof lists }) => (
    <ul className="grid gap-3 md:grid-cols-2">
      {items.map(({ list, owner, items: n }) => (
        <li key={list.id}>
          <Link href={`/shortlists/${list.id}`} className="block rounded-xl border border-line bg-white p-4 hover:border-accent">
            <p className="font-semibold">{list.name}</p>
            <p className="text-sm text-ink-soft">
              {count(n, "dye")} · kept by {owner}
            </p>
            {list.notes && <p className="mt-2 text-sm">{list.notes}</p>}
          </Link>
        </li>
      ))}
    </ul>
  );
  return (
    <>
      <PageHeader title="Shortlists" lead="Candidate dyes kept for a formulation, with notes. Everyone in the lab can read them; share one by its link or by e-mail." />
      <div className="grid gap-4 lg:grid-cols-3">
        <div className="space-y-4 lg:col-span-2">
          <h2 className="text-base font-semibold">Yours</h2>
          {mine.length === 0 ? <p className="rounded-xl border border-line bg-white p-4 text-sm">You keep no shortlists yet. Create one here, or from a dye's page.</p> : <Grid items={mine} />}
          <h2 className="text-base font-semibold">Colleagues'</h2>
          {others.length === 0 ? <p className="rounded-xl border border-line bg-white p-4 text-sm">None yet.</p> : <Grid items={others} />}
        </div>
        <Card title="New shortlist">
          <CreateShortlistForm />
        </Card>
      </div>
    </>
  );
}
