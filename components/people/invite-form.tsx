"use client";

import { useActionState } from "react";
import { inviteAction } from "@/app/actions/people";
import { Field, Select, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton, formKey } from "@/components/ui/form-status";

export function InviteForm() {
  const [state, action] = useActionState(inviteAction, null);
  const e = state?.fieldErrors ?? {};
  // After a refusal the form shows what was typed; after a success it starts empty for the next person.
  const v = (state?.ok === false && state.values) || {};
  return (
    <form key={formKey(state)} action={action} className="grid gap-4 md:grid-cols-4" noValidate data-testid="invite-form">
      <Field label="Name" name="name" error={e.name}>
        <TextInput name="name" defaultValue={v.name ?? ""} error={e.name} />
      </Field>
      <Field label="E-mail" name="email" error={e.email}>
        <TextInput name="email" type="email" defaultValue={v.email ?? ""} error={e.email} />
      </Field>
      <Field label="Role" name="role" error={e.role}>
        <Select name="role" defaultValue={v.role ?? "chemist"} error={e.role}>
          <option value="chemist">Chemist</option>
          <option value="formulator">Formulator</option>
          <option value="admin">Admin</option>
        </Select>
      </Field>
      <div className="flex items-end">
        <SubmitButton pendingText="Inviting…">Send invitation</SubmitButton>
      </div>
      <div className="md:col-span-4">
        <FormMessage state={state} />
      </div>
    </form>
  );
}
