"use client";

import { useActionState } from "react";
import { createSolventAction } from "@/app/actions/solvents";
import { Field, Select, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

const PARAMS = [
  { key: "et30", label: "ET(30), kcal/mol" },
  { key: "alpha", label: "Kamlet–Taft α" },
  { key: "beta", label: "Kamlet–Taft β" },
  { key: "piStar", label: "Kamlet–Taft π*" },
  { key: "permittivity", label: "Relative permittivity εr (about 25 °C)" },
] as const;

/** "Add a solvent" (admins); what was typed comes back after a refusal. */
export function SolventCreateForm() {
  const [state, action] = useActionState(async (prev: Awaited<ReturnType<typeof createSolventAction>>, formData: FormData) => {
    const result = await createSolventAction(prev, formData);
    return result && !result.ok ? { ...result, data: { typed: Object.fromEntries([...formData.entries()].filter(([k]) => !k.startsWith("$")).map(([k, v]) => [k, String(v)])) } } : result;
  }, null);
  const e = state?.fieldErrors ?? {};
  const typed = (state?.data?.typed ?? {}) as Record<string, string>;
  return (
    <form action={action} className="space-y-5" noValidate key={JSON.stringify(typed)}>
      <div className="grid gap-3 md:grid-cols-2">
        <Field label="Name" name="name" error={e.name}>
          <TextInput name="name" defaultValue={typed.name ?? ""} error={e.name} />
        </Field>
        <Field label="Synonyms and abbreviations (comma separated)" name="synonyms" error={e.synonyms}>
          <TextInput name="synonyms" defaultValue={typed.synonyms ?? ""} error={e.synonyms} />
        </Field>
      </div>
      {PARAMS.map((p) => (
        <div key={p.key} className="grid gap-3 md:grid-cols-[14rem_1fr]">
          <Field label={p.label} name={`${p.key}Value`} error={e[`${p.key}Value`]}>
            <TextInput name={`${p.key}Value`} inputMode="decimal" defaultValue={typed[`${p.key}Value`] ?? ""} error={e[`${p.key}Value`]} />
          </Field>
          <Field label={`Source of ${p.label.split(",")[0]}`} name={`${p.key}Source`} hint="Authors, year, table; leave the value empty if none is published" error={e[`${p.key}Source`]}>
            <TextInput name={`${p.key}Source`} defaultValue={typed[`${p.key}Source`] ?? ""} error={e[`${p.key}Source`]} />
          </Field>
        </div>
      ))}
      <div className="grid gap-3 md:grid-cols-[14rem_1fr]">
        <Field label="Medium class" name="medium" error={e.medium}>
          <Select name="medium" defaultValue={typed.medium ?? "dipolar-aprotic"}>
            <option value="protic">protic</option>
            <option value="dipolar-aprotic">dipolar aprotic</option>
            <option value="nonpolar">non-polar</option>
          </Select>
        </Field>
        <Field label="Why this class" name="mediumSource" hint="e.g. O–H donor (protic); or εr and no H-bond donor" error={e.mediumSource}>
          <TextInput name="mediumSource" defaultValue={typed.mediumSource ?? ""} error={e.mediumSource} />
        </Field>
      </div>
      <Field label="Cautions shown beside the solvent" name="cautions" hint="From the supplier's safety data sheet" error={e.cautions}>
        <TextArea name="cautions" defaultValue={typed.cautions ?? ""} />
      </Field>
      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton pendingText="Adding…">Add the solvent</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
