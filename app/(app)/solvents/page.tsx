import type { Metadata } from "next";
import { db } from "@/db/client";
import { listSolvents } from "@/db/queries/solvents";
import { Badge, PageHeader } from "@/components/ui/card";
import { SafetyNotice } from "@/components/ui/safety";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { MEDIUM_LABELS } from "@/lib/solvents/parameters";

export const metadata: Metadata = { title: "Solvents" };

function Value({ v, source, digits = 2 }: { v: number | null; source: string | null; digits?: number }) {
  if (v === null) return <span className="text-ink-soft" title="No published value in the reference data shipped">—</span>;
  return (
    <span title={source ?? undefined} className="cursor-help tabular-nums underline decoration-dotted decoration-ink-soft/40 underline-offset-4">
      {v.toFixed(digits)}
    </span>
  );
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
  const head = (label: string, k: keyof typeof keys, title?: string) => (
    <th className="px-3 py-3 text-right" title={title}>
      <a href={`?sort=${k}`} className={sort === k ? "text-accent" : "hover:text-ink"}>
        {label}
      </a>
    </th>
  );
  return (
    <>
      <PageHeader
        title="Solvents"
        lead="Published polarity parameters of the solvent panel. Hover a value for its source. ETN = (ET(30) − 30.7)/32.4 (Reichardt). Medium class by common practice: O–H/N–H donors are protic; aprotic solvents with εr ≥ 5 are dipolar aprotic."
      />
      <div className="mb-4">
        <SafetyNotice />
      </div>
      <div className="overflow-x-auto rounded-xl border border-line bg-white">
        <table className="w-full text-sm">
          <thead className="border-b border-line bg-paper-deep/50 text-xs text-ink-soft">
            <tr>
              <th className="px-3 py-3 text-left">
                <a href="?sort=name">Solvent</a>
              </th>
              <th className="px-3 py-3 text-left">Medium</th>
              {head("ET(30)", "et30", "kcal/mol")}
              <th className="px-3 py-3 text-right">ETN</th>
              {head("α", "alpha", "Kamlet–Taft H-bond donor acidity")}
              {head("β", "beta", "Kamlet–Taft H-bond acceptor basicity")}
              {head("π*", "pistar", "Kamlet–Taft dipolarity/polarizability")}
              {head("εr", "eps", "relative permittivity")}
              <th className="px-3 py-3 text-left">Cautions</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {rows.map((s) => (
              <tr key={s.id} data-testid="solvent-row">
                <td className="px-3 py-2">
                  {canEdit ? (
                    <a href={`/solvents/${s.id}`} className="font-medium text-accent hover:underline" title="Edit values and sources">
                      {s.name}
                    </a>
                  ) : (
                    <span className="font-medium">{s.name}</span>
                  )}
                  {s.synonyms.length > 0 && <span className="block text-xs text-ink-soft">{s.synonyms.join(", ")}</span>}
                </td>
                <td className="px-3 py-2">
                  <Badge tone={s.medium === "protic" ? "accent" : s.medium === "dipolar-aprotic" ? "ok" : "neutral"}>{MEDIUM_LABELS[s.medium]}</Badge>
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.et30} source={s.et30Source} digits={1} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.etn} source="derived: (ET(30) − 30.7)/32.4" digits={3} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.ktAlpha} source={s.ktAlphaSource} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.ktBeta} source={s.ktBetaSource} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.ktPiStar} source={s.ktPiStarSource} />
                </td>
                <td className="px-3 py-2 text-right">
                  <Value v={s.permittivity} source={s.permittivitySource} digits={1} />
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
