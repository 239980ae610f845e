"use client";

import { useActionState } from "react";
import type { ActionState } from "@/lib/auth/guard";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

/** One admin action on a profile (approve, retire, reopen, re-derive) as a small form with its message. */
export function ActionButton({
  action,
  fields,
  label,
  pendingText,
  variant = "secondary",
  children,
}: {
  action: (prev: ActionState, form: FormData) => Promise<ActionState>;
  fields: Record<string, string>;
  label: string;
  pendingText?: string;
  variant?: "primary" | "secondary" | "danger";
  children?: React.ReactNode;
}) {
  const [state, run] = useActionState(action, null);
  return (
    <form action={run} className="space-y-2">
      {Object.entries(fields).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      {children}
      <SubmitButton variant={variant} pendingText={pendingText}>
        {label}
      </SubmitButton>
      <FormMessage state={state} />
    </form>
  );
}
