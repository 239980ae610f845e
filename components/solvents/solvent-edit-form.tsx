"use client";

import { useActionState } from "react";
import { updateSolventAction } from "@/app/actions/solvents";
import type { Solvent } from "@/db/schema";
import { Field, Select, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton, formKey } from "@/components/ui/form-status";

const PARAMS = [
  { key: "et30", label: "ET(30), kcal/mol", value: (s: Solvent) => s.et30, source: (s: Solvent) => s.et30Source },
  { key: "alpha", label: "Kamlet–Taft α", value: (s: Solvent) => s.ktAlpha, source: (s: Solvent) => s.ktAlphaSource },
  { key: "beta", label: "Kamlet–Taft β", value: (s: Solvent) => s.ktBeta, source: (s: Solvent) => s.ktBetaSource },
  { key: "piStar", label: "Kamlet–Taft π*", value: (s: Solvent) => s.ktPiStar, source: (s: Solvent) => s.ktPiStarSource },
  { key: "permittivity", label: "Relative permittivity εr", value: (s: Solvent) => s.permittivity, source: (s: Solvent) => s.permittivitySource },
] as const;

export function SolventEditForm({ solvent }: { solvent: Solvent }) {
  const [state, action] = useActionState(updateSolventAction, null);
  const e = state?.fieldErrors ?? {};
  // After a refusal, show what was typed rather than the stored value.
  const v = (state?.ok === false && state.values) || {};
  return (
    <form key={formKey(state)} action={action} className="space-y-5" noValidate>
      <input type="hidden" name="id" value={solvent.id} />
      {PARAMS.map((p) => (
        <div key={p.key} className="grid gap-3 md:grid-cols-[12rem_1fr]">
          <Field label={p.label} name={`${p.key}Value`} error={e[`${p.key}Value`]}>
            <TextInput name={`${p.key}Value`} inputMode="decimal" defaultValue={v[`${p.key}Value`] ?? p.value(solvent) ?? ""} error={e[`${p.key}Value`]} />
          </Field>
          <Field label="Source" name={`${p.key}Source`} hint="Authors, year, table; leave the value empty if none is published" error={e[`${p.key}Source`]}>
            <TextInput name={`${p.key}Source`} defaultValue={v[`${p.key}Source`] ?? p.source(solvent) ?? ""} error={e[`${p.key}Source`]} />
          </Field>
        </div>
      ))}
      <div className="grid gap-3 md:grid-cols-[12rem_1fr]">
        <Field label="Medium class" name="medium" error={e.medium}>
          <Select name="medium" defaultValue={v.medium ?? solvent.medium}>
            <option value="protic">protic</option>
            <option value="dipolar-aprotic">dipolar aprotic</option>
            <option value="nonpolar">non-polar</option>
          </Select>
        </Field>
        <Field label="Why this class" name="mediumSource" error={e.mediumSource}>
          <TextInput name="mediumSource" defaultValue={v.mediumSource ?? solvent.mediumSource} error={e.mediumSource} />
        </Field>
      </div>
      <Field label="Cautions shown beside the solvent" name="cautions" error={e.cautions}>
        <TextArea name="cautions" defaultValue={v.cautions ?? solvent.cautions} />
      </Field>
      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton pendingText="Saving…">Save solvent</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
