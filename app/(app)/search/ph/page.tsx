import type { Metadata } from "next";
import { Suspense } from "react";
import { PhSearch } from "@/components/search/ph-search";
import { SearchTabs } from "@/components/search/search-tabs";
import { PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Search by pH transition" };

export default async function PhSearchPage() {
  await pageAccess(ANY_ROLE);
  return (
    <>
      <PageHeader title="Search by pH transition" lead="Find the indicator that changes colour between two pH values, from the stored pKa fits of the pH series chemists have grouped." />
      <SearchTabs current="ph" />
      <Suspense fallback={<p className="text-sm text-ink-soft">Loading the search…</p>}>
        <PhSearch />
      </Suspense>
    </>
  );
}
