"use client";

import { useActionState } from "react";
import { updateDyeAction } from "@/app/actions/dyes";
import type { Dye } from "@/db/schema";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

export function DyeEditForm({ dye }: { dye: Dye }) {
  const [state, action] = useActionState(updateDyeAction, null);
  const e = state?.fieldErrors ?? {};
  // After a refusal, show what was typed rather than the stored value.
  const v = (state?.ok === false && state.values) || {};
  return (
    <form action={action} className="grid gap-4 md:grid-cols-2" noValidate>
      <input type="hidden" name="id" value={dye.id} />
      <Field label="Name" name="name" error={e.name}>
        <TextInput name="name" defaultValue={v.name ?? dye.name} error={e.name} />
      </Field>
      <Field label="Class" name="dyeClass" error={e.dyeClass}>
        <TextInput name="dyeClass" defaultValue={v.dyeClass ?? dye.dyeClass} error={e.dyeClass} />
      </Field>
      <Field label="CAS number" name="casNumber" hint="Checked with the CAS check digit, e.g. 7732-18-5" error={e.casNumber}>
        <TextInput name="casNumber" defaultValue={v.casNumber ?? dye.casNumber ?? ""} error={e.casNumber} />
      </Field>
      <Field label="Molar mass (g/mol)" name="molarMass" error={e.molarMass}>
        <TextInput name="molarMass" inputMode="decimal" defaultValue={v.molarMass ?? dye.molarMass ?? ""} error={e.molarMass} />
      </Field>
      <Field label="Synonyms (comma separated)" name="synonyms" error={e.synonyms}>
        <TextInput name="synonyms" defaultValue={v.synonyms ?? dye.synonyms.join(", ")} error={e.synonyms} />
      </Field>
      <Field label="Hazards" name="hazards" error={e.hazards}>
        <TextInput name="hazards" defaultValue={v.hazards ?? dye.hazards} error={e.hazards} />
      </Field>
      <div className="md:col-span-2">
        <Field label="Notes" name="notes" error={e.notes}>
          <TextArea name="notes" defaultValue={v.notes ?? dye.notes} error={e.notes} />
        </Field>
      </div>
      <div className="flex items-center gap-3 md:col-span-2">
        <SubmitButton pendingText="Saving…">Save dye</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
