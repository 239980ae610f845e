"use client";

import { useFormStatus } from "react-dom";
import type { ActionState } from "@/lib/auth/guard";
import { Button } from "./button";
import { Notice } from "./card";

export function SubmitButton({ children, pendingText, variant }: { children: React.ReactNode; pendingText?: string; variant?: "primary" | "secondary" | "danger" }) {
  const { pending } = useFormStatus();
  return (
    <Button type="submit" disabled={pending} variant={variant} aria-busy={pending}>
      {pending ? (pendingText ?? "Working…") : children}
    </Button>
  );
}

export function FormMessage({ state }: { state: ActionState }) {
  if (!state?.message) return null;
  return <Notice tone={state.ok ? "ok" : "error"}>{state.message}</Notice>;
}

/**
 * A key that changes with what the form should show after a refusal. React applies a new defaultValue
 * to text inputs when the form resets, but not to a <select>'s chosen option; remounting does both.
 */
export function formKey(state: ActionState): string {
  return state ? `${state.ok}:${JSON.stringify(state.values ?? {})}` : "initial";
}
