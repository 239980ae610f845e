import type { Metadata } from "next";
import { db } from "@/db/client";
import { listDyes } from "@/db/queries/dyes";
import { candidateVials } from "@/db/queries/ph-series";
import { listSolvents } from "@/db/queries/solvents";
import { SeriesEditor } from "@/components/acid-base/series-editor";
import { MediumPicker, editorVials } from "@/components/acid-base/medium-picker";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "New pH series" };

type Query = { dyeId?: string; solventId?: string; secondSolventId?: string; x2?: string };

export default async function NewPhSeriesPage({ searchParams }: { searchParams: Promise<Query> }) {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="Grouping pH series" />;
  const q = await searchParams;
  const handle = db();
  const dyes = listDyes(handle).map((d) => ({ id: d.id, label: `${d.code} · ${d.name}` }));
  const solvents = listSolvents(handle).map((s) => ({ id: s.id, label: s.name }));
  const dye = dyes.find((d) => d.id === q.dyeId);
  const solvent = solvents.find((s) => s.id === q.solventId);
  const second = q.secondSolventId ? solvents.find((s) => s.id === q.secondSolventId) : null;
  const x2 = q.x2 && q.x2.trim() !== "" ? Number(q.x2) : null;
  const blendOk = !q.secondSolventId || (second && x2 !== null && x2 > 0 && x2 < 1);
  const ready = dye && solvent && blendOk;
  const mediumLabel = solvent ? (second ? `${solvent.label} + ${second.label}, x₂ = ${x2}` : solvent.label) : "";
  return (
    <>
      <PageHeader title="Group vials into a pH series" lead="Choose the dye and the medium; then tick the vials that belong to the series and give each its pH." />
      <Card title="1 · Dye and medium">
        <MediumPicker dyes={dyes} solvents={solvents} value={{ dyeId: q.dyeId ?? "", solventId: q.solventId ?? "", secondSolventId: q.secondSolventId ?? "", x2: q.x2 ?? "" }} />
        {q.secondSolventId && !blendOk && <Notice tone="error">Give the second solvent's mole fraction x₂, between 0 and 1, or clear the second solvent.</Notice>}
      </Card>
      {ready && (
        <Card title={`2 · Vials of ${dye.label} in ${mediumLabel}`} className="mt-4">
          <SeriesEditor
            head={{ dyeId: dye.id, name: "", solventId: solvent.id, secondSolventId: second?.id ?? null, secondSolventMoleFraction: second ? x2 : null, ionicStrengthMolL: null, notes: "" }}
            mediumLabel={mediumLabel}
            candidates={editorVials(candidateVials(handle, { dyeId: dye.id, solventId: solvent.id, secondSolventId: second?.id ?? null, secondSolventMoleFraction: second ? x2 : null }))}
            selected={{}}
          />
        </Card>
      )}
    </>
  );
}
