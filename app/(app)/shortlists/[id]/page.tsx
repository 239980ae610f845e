import Link from "next/link";
import { notFound } from "next/navigation";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { shortlists } from "@/db/schema";
import { shortlistDyes } from "@/db/queries/shortlists";
import { Card, PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";

export default async function ShortlistPage({ params }: { params: Promise<{ id: string }> }) {
  await pageAccess(ANY_ROLE);
  const { id } = await params;
  const handle = db();
  const list = handle.select().from(shortlists).where(eq(shortlists.id, id)).get();
  if (!list) notFound();
  const items = shortlistDyes(handle, { shortlistId: id });
  return (
    <>
      <PageHeader title={list.name} lead={list.notes} />
      <Card>
        <ul className="divide-y divide-line">
          {items.map(({ item, dye }) => (
            <li key={item.id} className="py-2 text-sm">
              <Link href={`/catalogue/${encodeURIComponent(dye.code)}`} className="font-semibold text-accent hover:underline">
                {dye.code}
              </Link>{" "}
              {dye.name} <span className="text-ink-soft">({dye.dyeClass})</span>
              {item.note && <p className="text-ink-soft">{item.note}</p>}
            </li>
          ))}
        </ul>
      </Card>
    </>
  );
}
