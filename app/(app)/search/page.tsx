import type { Metadata } from "next";
import { Suspense } from "react";
import { db } from "@/db/client";
import { listShortlists } from "@/db/queries/shortlists";
import { listSolvents } from "@/db/queries/solvents";
import { ColourSearch } from "@/components/search/colour-search";
import { SearchTabs } from "@/components/search/search-tabs";
import { PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Search by colour" };

export default async function SearchPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const solvents = listSolvents(db()).map((s) => ({ id: s.id, name: s.name }));
  const lists = listShortlists(db(), { ownerId: user.id }).map(({ list }) => ({ id: list.id, name: list.name }));
  return (
    <>
      <PageHeader
        title="Search by colour"
        lead="Give a target colour and a condition; each dye appears once, with the condition whose mean colour (of its accepted replicates there) is closest to the target, ranked exactly by CIEDE2000."
      />
      <SearchTabs current="colour" />
      <Suspense fallback={<p className="text-sm text-ink-soft">Loading the search…</p>}>
        <ColourSearch solvents={solvents} lists={lists} />
      </Suspense>
    </>
  );
}
