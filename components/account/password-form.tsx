"use client";

import { useActionState } from "react";
import { changePasswordAction } from "@/app/actions/auth";
import { Field, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

export function ChangePasswordForm() {
  const [state, action] = useActionState(changePasswordAction, null);
  const e = state?.fieldErrors ?? {};
  return (
    <form action={action} className="grid gap-4 md:grid-cols-3" noValidate>
      <Field label="Current password" name="currentPassword" error={e.currentPassword}>
        <TextInput name="currentPassword" type="password" autoComplete="current-password" error={e.currentPassword} />
      </Field>
      <Field label="New password" name="password" hint="At least 10 characters" error={e.password}>
        <TextInput name="password" type="password" autoComplete="new-password" error={e.password} />
      </Field>
      <Field label="New password again" name="confirm" error={e.confirm}>
        <TextInput name="confirm" type="password" autoComplete="new-password" error={e.confirm} />
      </Field>
      <div className="flex flex-wrap items-center gap-3 md:col-span-3">
        <SubmitButton pendingText="Changing…">Change password</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
