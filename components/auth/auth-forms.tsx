"use client";

import Link from "next/link";
import { useActionState } from "react";
import { acceptInvitationAction, completeResetAction, requestResetAction, signInAction } from "@/app/actions/auth";
import { Field, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

export function SignInForm({ next }: { next?: string }) {
  const [state, action] = useActionState(signInAction, null);
  return (
    <form action={action} className="space-y-4" noValidate>
      <input type="hidden" name="next" value={next ?? "/"} />
      <Field label="E-mail" name="email" error={state?.fieldErrors?.email}>
        <TextInput name="email" type="email" autoComplete="username" required autoFocus defaultValue={state?.values?.email ?? ""} error={state?.fieldErrors?.email} />
      </Field>
      <Field label="Password" name="password" error={state?.fieldErrors?.password}>
        <TextInput name="password" type="password" autoComplete="current-password" required error={state?.fieldErrors?.password} />
      </Field>
      <FormMessage state={state} />
      <div className="flex items-center justify-between gap-3">
        <SubmitButton pendingText="Signing in…">Sign in</SubmitButton>
        <Link href="/forgot-password" className="text-sm font-medium text-accent">
          Forgot your password?
        </Link>
      </div>
    </form>
  );
}

export function ResetRequestForm() {
  const [state, action] = useActionState(requestResetAction, null);
  return (
    <form action={action} className="space-y-4" noValidate>
      <Field label="E-mail of your account" name="email" error={state?.fieldErrors?.email}>
        <TextInput name="email" type="email" autoComplete="username" required defaultValue={state?.values?.email ?? ""} error={state?.fieldErrors?.email} />
      </Field>
      <FormMessage state={state} />
      <SubmitButton pendingText="Sending…">Send reset link</SubmitButton>
    </form>
  );
}

export function NewPasswordForm({ token, mode }: { token: string; mode: "reset" | "invite" }) {
  const [state, action] = useActionState(mode === "reset" ? completeResetAction : acceptInvitationAction, null);
  return (
    <form action={action} className="space-y-4" noValidate>
      <input type="hidden" name="token" value={token} />
      <Field label="New password" name="password" hint="At least 10 characters. A short sentence is easy to type with gloves." error={state?.fieldErrors?.password}>
        <TextInput name="password" type="password" autoComplete="new-password" required error={state?.fieldErrors?.password} />
      </Field>
      <Field label="The same password again" name="confirm" error={state?.fieldErrors?.confirm}>
        <TextInput name="confirm" type="password" autoComplete="new-password" required error={state?.fieldErrors?.confirm} />
      </Field>
      <FormMessage state={state} />
      <SubmitButton pendingText="Saving…">{mode === "reset" ? "Set new password" : "Set password and sign in"}</SubmitButton>
    </form>
  );
}
