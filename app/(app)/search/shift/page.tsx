import type { Metadata } from "next";
import { Suspense } from "react";
import { SearchTabs } from "@/components/search/search-tabs";
import { ShiftSearch } from "@/components/search/shift-search";
import { PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Search by colour shift" };

export default async function ShiftSearchPage() {
  await pageAccess(ANY_ROLE);
  return (
    <>
      <PageHeader
        title="Search by colour shift"
        lead="Find the dye whose colour changes the way a product needs between two conditions: from a colour in A to a colour in B, or simply the largest change. Every pair of accepted colours is scored: by closeness to the colours you give, otherwise by the size of the change in ΔEOK (OKLab, which holds for large changes); the minimum shift is in ΔE00 (CIEDE2000)."
      />
      <SearchTabs current="shift" />
      <Suspense fallback={<p className="text-sm text-ink-soft">Loading the search…</p>}>
        <ShiftSearch />
      </Suspense>
    </>
  );
}
