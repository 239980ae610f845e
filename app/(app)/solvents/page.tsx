import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { listSolvents } from "@/db/queries/solvents";
import { Badge, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { SourcedValue } from "@/components/ui/sourced-value";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { MEDIUM_LABELS } from "@/lib/solvents/parameters";

export const metadata: Metadata = { title: "Solvents" };

function Value({ v, source, digits = 2, label }: { v: number | null; source: string | null; digits?: number; label: string }) {
  if (v === null) return <span className="text-ink-soft">— <span className="sr-only">no published value in the shipped reference data</span></span>;
  return <SourcedValue value={v.toFixed(digits)} source={source} label={label} />;
}

export default async function SolventsPage({ searchParams }: { searchParams: Promise<{ sort?: string }> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const canEdit = user.role === "admin";
  const { sort = "et30" } = await searchParams;
  const keys = { et30: "et30", alpha: "ktAlpha", beta: "ktBeta", pistar: "ktPiStar", eps: "permittivity", name: "name" } as const;
  const key = keys[sort as keyof typeof keys] ?? "et30";
  const rows = listSolvents(db()).sort((a, b) => {
    if (key === "name") return a.name.localeCompare(b.name);
    return ((b[key] as number | null) ?? -Infinity) - ((a[key] as number | null) ?? -Infinity);
  });
  // Every column says its unit ("1" for dimensionless scales) and what it measures, in the header itself.
  const head = (label: string, k: keyof typeof keys, unit: string, what: string) => (
    <th className="px-3 py-3 text-right align-bottom font-normal">
      <a href={`?sort=${k}`} aria-current={sort === k ? "true" : undefined} className={`block ${sort === k ? "font-bold text-ink underline" : "hover:text-ink hover:underline"}`}>
        {label}
        {sort === k ? " ↓" : ""}
      </a>
      <span className="block text-[11px]">{unit}</span>
      <span className="block text-[11px]">{what}</span>
    </th>
  );
  return (
    <>
      <PageHeader
        title="Solvents"
        actions={
          user.role === "admin" ? (
            <Link href="/solvents/new" className="inline-flex min-h-11 items-center rounded bg-accent px-4 text-sm font-semibold text-white">
              Add a solvent
            </Link>
          ) : undefined
        }
        lead="Published polarity parameters of the solvent panel. Press a value (marked “src”) for its source. ETN = (ET(30) − 30.7)/32.4 (Reichardt). Medium class by common practice: O–H/N–H donors are protic; aprotic solvents with εr ≥ 5 are dipolar aprotic."
      />
      <div className="mb-4">
        <SafetyNotice />
      </div>
      <div className="scroll-x border border-line bg-white">
        <table className="w-full text-sm">
          <thead className="border-b border-ink text-xs text-ink-soft">
            <tr>
              <th className="px-3 py-3 text-left align-bottom">
                <a href="?sort=name" className="underline">Solvent</a>
              </th>
              <th className="px-3 py-3 text-left align-bottom">Medium</th>
              {head("ET(30)", "et30", "kcal/mol", "Reichardt polarity")}
              <th className="px-3 py-3 text-right align-bottom font-normal">
                ETN<span className="block text-[11px]">1 (dimensionless)</span>
                <span className="block text-[11px]">normalised ET(30)</span>
              </th>
              {head("α", "alpha", "1 (dimensionless)", "Kamlet–Taft H-bond donor acidity")}
              {head("β", "beta", "1 (dimensionless)", "Kamlet–Taft H-bond acceptor basicity")}
              {head("π*", "pistar", "1 (dimensionless)", "Kamlet–Taft dipolarity/polarizability")}
              {head("εr", "eps", "1 (dimensionless)", "relative permittivity")}
              <th className="px-3 py-3 text-left align-bottom">Cautions</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {rows.map((s) => (
              <tr key={s.id} data-testid="solvent-row">
                <td className="px-3 py-2">
                  {canEdit ? (
                    <a href={`/solvents/${s.id}`} className="font-medium text-accent">
                      {s.name}
                    </a>
                  ) : (
                    <span className="font-medium">{s.name}</span>
                  )}
                  {s.synonyms.length > 0 && <span className="block text-xs text-ink-soft">{s.synonyms.join(", ")}</span>}
                </td>
                <td className="px-3 py-2">
                  <Badge>{MEDIUM_LABELS[s.medium]}</Badge>
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.et30} source={s.et30Source} digits={1} label={`${s.name}, ET(30) in kcal/mol,`} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.etn} source="Derived: ETN = (ET(30) − 30.7)/32.4 (Reichardt)" digits={3} label={`${s.name}, ETN,`} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.ktAlpha} source={s.ktAlphaSource} label={`${s.name}, α,`} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.ktBeta} source={s.ktBetaSource} label={`${s.name}, β,`} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.ktPiStar} source={s.ktPiStarSource} label={`${s.name}, π*,`} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.permittivity} source={s.permittivitySource} digits={1} label={`${s.name}, εr,`} />
                </td>
                <td className="max-w-xs px-3 py-2 text-xs text-ink-soft">{s.cautions || "Read the supplier's SDS."}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-3 text-xs text-ink-soft">
        Sources: ET(30) from a compilation following Reichardt (water 63.1 kcal/mol from Reichardt 1994, from memory); Kamlet–Taft α, β, π* from a secondary table whose π* agrees with Marcus
        (1993); εr from Lide (1995, CRC Handbook) via Gu et al. (2004). Dashes mean no value in the shipped reference data; fits leave such solvents out.
      </p>
    </>
  );
}
