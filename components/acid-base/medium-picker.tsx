import type { CandidateVial } from "@/db/queries/ph-series";
import { Button } from "@/components/ui/button";
import { Field, Select, TextInput } from "@/components/ui/field";
import type { EditorVial } from "./series-editor";

export type Option = { id: string; label: string };

/** The <option>s of a dye or solvent list, after a first empty choice. */
export function Options({ items, empty }: { items: Option[]; empty: string }) {
  return (
    <>
      <option value="">{empty}</option>
      {items.map((o) => (
        <option key={o.id} value={o.id}>
          {o.label}
        </option>
      ))}
    </>
  );
}

/** The dye and medium of a new series, as a plain GET form: the choice lives in the address. */
export function MediumPicker({ dyes, solvents, value }: { dyes: Option[]; solvents: Option[]; value: { dyeId: string; solventId: string; secondSolventId: string; x2: string } }) {
  return (
    <form method="get" className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5" aria-label="Dye and medium">
      <Field label="Dye" name="dyeId">
        <Select name="dyeId" defaultValue={value.dyeId} required>
          <Options items={dyes} empty="choose a dye" />
        </Select>
      </Field>
      <Field label="Solvent" name="solventId">
        <Select name="solventId" defaultValue={value.solventId} required>
          <Options items={solvents} empty="choose a solvent" />
        </Select>
      </Field>
      <Field label="Second solvent (blends only)" name="secondSolventId">
        <Select name="secondSolventId" defaultValue={value.secondSolventId}>
          <Options items={solvents} empty="none (neat solvent)" />
        </Select>
      </Field>
      <Field label="Its mole fraction x₂" name="x2">
        <TextInput name="x2" inputMode="decimal" defaultValue={value.x2} placeholder="e.g. 0.25" />
      </Field>
      <div className="flex items-end">
        <Button type="submit" variant="secondary">
          Show the vials
        </Button>
      </div>
    </form>
  );
}

/** Candidate vials as the client editor takes them (dates as text). */
export function editorVials(list: CandidateVial[]): EditorVial[] {
  return list.map((c) => ({ ...c, createdAt: c.createdAt.toISOString() }));
}
