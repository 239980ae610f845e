"use client";

import { useActionState } from "react";
import { createTokenAction, revokeTokenAction } from "@/app/actions/tokens";
import { Field, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";


export function CreateTokenForm() {
  const [state, action] = useActionState(createTokenAction, null);
  const token = state?.ok ? (state.data?.token as string | undefined) : undefined;
  return (
    <div className="space-y-3">
      <form action={action} className="flex flex-wrap items-end gap-3" noValidate>
        <div className="min-w-64 flex-1">
          <Field label="Token name" name="name" hint="e.g. plate-reader export script" error={state?.fieldErrors?.name}>
            <TextInput name="name" error={state?.fieldErrors?.name} />
          </Field>
        </div>
        <SubmitButton pendingText="Creating…">Create token</SubmitButton>
      </form>
      <FormMessage state={state} />
      {token && (
        <div className="rounded-lg border border-accent/40 bg-accent-soft p-3">
          <p className="text-sm font-medium">Your new token (shown once):</p>
          <code data-testid="new-token" className="mt-1 block break-all rounded bg-white p-2 font-mono text-sm">
            {token}
          </code>
          <p className="mt-1 text-xs text-ink-soft">Send it as the header Authorization: Bearer &lt;token&gt;.</p>
        </div>
      )}
    </div>
  );
}

export function RevokeTokenButton({ tokenId }: { tokenId: string }) {
  const [state, action, pending] = useActionState(revokeTokenAction, null);
  return (
    <form action={action} className="flex items-center gap-2">
      <input type="hidden" name="tokenId" value={tokenId} />
      <button disabled={pending} className="min-h-11 rounded-lg border border-bad/50 px-3 text-sm font-medium text-bad disabled:opacity-50">
        Revoke
      </button>
      {state && !state.ok && <FormMessage state={state} />}
    </form>
  );
}
