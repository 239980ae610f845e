import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { db } from "@/db/client";
import { findShortlist, shortlistConditionColours, shortlistDyes } from "@/db/queries/shortlists";
import { ConditionColours } from "@/components/shortlists/condition-colours";
import { ItemNoteForm, RemoveItemForm, ShareShortlistForm } from "@/components/shortlists/shortlist-forms";
import { ButtonLink } from "@/components/ui/button";
import { Card, PageHeader } from "@/components/ui/card";
import { SwatchKey } from "@/components/ui/swatch";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { coloursByDye, summariseByCondition } from "@/lib/search/shortlist-csv";
import { count } from "@/lib/text/count";

export const metadata: Metadata = { title: "Shortlist" };

export default async function ShortlistPage({ params }: { params: Promise<{ id: string }> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const { id } = await params;
  const handle = db();
  const found = findShortlist(handle, { id });
  if (!found) notFound();
  const { list, owner } = found;
  const items = shortlistDyes(handle, { shortlistId: id });
  // The export's query and summaries (app/api/shortlists/[id]/export), so the page and the CSV agree.
  const byDye = coloursByDye(summariseByCondition(shortlistConditionColours(handle, { shortlistId: id })));
  const editable = list.ownerId === user.id || user.role === "admin";
  const codes = items.slice(0, 6).map((i) => encodeURIComponent(i.dye.code));
  return (
    <>
      <PageHeader
        title={list.name}
        lead={
          <>
            Kept by {owner}. {list.notes}
          </>
        }
        actions={
          <>
            {codes.length >= 2 && <ButtonLink href={`/compare?dyes=${codes.join(",")}`}>Compare{items.length > 6 ? " the first 6" : ""}</ButtonLink>}
            <a href={`/api/shortlists/${id}/export`} download className="inline-flex min-h-11 items-center rounded-lg border border-line bg-white px-4 text-sm font-semibold hover:bg-paper-deep">
              Export CSV
            </a>
            <ButtonLink href={`/shortlists/${id}/print`}>Printable page</ButtonLink>
          </>
        }
      />
      <div className="grid gap-4 lg:grid-cols-3">
        <Card title={count(items.length, "dye")} className="lg:col-span-2">
          {items.length === 0 ? (
            <p className="text-sm text-ink-soft">No dyes yet: open a dye from the catalogue or a search and add it here.</p>
          ) : (
            <ul className="divide-y divide-line" aria-label="Dyes on this shortlist">
              {items.map(({ item, dye, accepted }) => (
                <li key={item.id} className="space-y-2 py-3 text-sm" data-testid="shortlist-item">
                  <div className="flex flex-wrap items-baseline gap-2">
                    <Link href={`/catalogue/${encodeURIComponent(dye.code)}`} className="font-semibold text-accent hover:underline">
                      {dye.code}
                    </Link>
                    <span>{dye.name}</span>
                    <span className="text-ink-soft">
                      ({dye.dyeClass}, {accepted} accepted measurements)
                    </span>
                  </div>
                  <ConditionColours colours={byDye.get(dye.code) ?? []} />
                  {editable ? (
                    <div className="flex flex-wrap items-start gap-2">
                      <ItemNoteForm itemId={item.id} note={item.note} code={dye.code} />
                      <RemoveItemForm itemId={item.id} code={dye.code} />
                    </div>
                  ) : (
                    item.note && <p className="text-ink-soft">{item.note}</p>
                  )}
                </li>
              ))}
            </ul>
          )}
          {items.length > 0 && (
            <div className="mt-3 space-y-1 border-t border-line pt-3 text-xs text-ink-soft" data-testid="shortlist-colour-note">
              <p>
                Each colour is the mean CIELAB of the dye&apos;s accepted replicates in that condition, relative to D65 with the CIE 1931 2° observer unless the
                tile names another; the spread is the root mean square of their ΔE00 from that mean. The CSV export carries the same numbers unrounded, with each
                solvent&apos;s parameters.
              </p>
              <SwatchKey />
            </div>
          )}
        </Card>
        <Card title="Share">
          <p className="mb-3 text-sm text-ink-soft">
            Anyone signed in to this Solvatlas can open the link of this page. Or send it by e-mail:
          </p>
          <ShareShortlistForm shortlistId={id} />
        </Card>
      </div>
    </>
  );
}
