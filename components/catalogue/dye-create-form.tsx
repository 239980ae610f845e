"use client";

import { useActionState } from "react";
import { createDyeAction } from "@/app/actions/dyes";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

/** The catalogue's "Add a dye" form; what was typed stays after a refusal (React 19 resets uncontrolled forms, so values come back from the form data). */
export function DyeCreateForm({ initialName = "" }: { initialName?: string }) {
  const [state, action] = useActionState(async (prev: Awaited<ReturnType<typeof createDyeAction>>, formData: FormData) => {
    const result = await createDyeAction(prev, formData);
    return result && !result.ok ? { ...result, data: { ...(result.data ?? {}), typed: Object.fromEntries([...formData.entries()].filter(([k]) => !k.startsWith("$")).map(([k, v]) => [k, String(v)])) } } : result;
  }, null);
  const e = state?.fieldErrors ?? {};
  const typed = (state?.data?.typed ?? {}) as Record<string, string>;
  const v = (name: string, fallback = "") => typed[name] ?? fallback;
  return (
    <form action={action} className="grid gap-4 md:grid-cols-2" noValidate key={JSON.stringify(typed)}>
      <Field label="Code" name="code" hint="Your lab's code for the dye, e.g. KB-AZ-210 (letters, digits, dots, dashes)" error={e.code}>
        <TextInput name="code" defaultValue={v("code")} error={e.code} required />
      </Field>
      <Field label="Name" name="name" error={e.name}>
        <TextInput name="name" defaultValue={v("name", initialName)} error={e.name} required />
      </Field>
      <Field label="Class" name="dyeClass" hint="e.g. azo, merocyanine, betaine" error={e.dyeClass}>
        <TextInput name="dyeClass" defaultValue={v("dyeClass")} error={e.dyeClass} required />
      </Field>
      <Field label="CAS number (optional)" name="casNumber" hint="Checked with the CAS check digit, e.g. 7732-18-5" error={e.casNumber}>
        <TextInput name="casNumber" defaultValue={v("casNumber")} error={e.casNumber} />
      </Field>
      <Field label="Molar mass, g/mol (optional)" name="molarMass" error={e.molarMass}>
        <TextInput name="molarMass" inputMode="decimal" defaultValue={v("molarMass")} error={e.molarMass} />
      </Field>
      <Field label="Synonyms (comma separated)" name="synonyms" error={e.synonyms}>
        <TextInput name="synonyms" defaultValue={v("synonyms")} error={e.synonyms} />
      </Field>
      <Field label="Hazards" name="hazards" hint="From the supplier's safety data sheet" error={e.hazards}>
        <TextInput name="hazards" defaultValue={v("hazards")} error={e.hazards} />
      </Field>
      <div className="md:col-span-2">
        <Field label="Notes" name="notes" error={e.notes}>
          <TextArea name="notes" defaultValue={v("notes")} error={e.notes} />
        </Field>
      </div>
      <div className="flex items-center gap-3 md:col-span-2">
        <SubmitButton pendingText="Adding…">Add the dye</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
