"use client";

import { useActionState } from "react";
import { reviewAction } from "@/app/actions/review";
import { FormMessage } from "@/components/ui/form-status";

export function ReviewButtons({ measurementId, own }: { measurementId: string; own: boolean }) {
  const [state, action, pending] = useActionState(reviewAction, null);
  if (own) return <p className="text-xs text-ink-soft">Your own measurement: another chemist or an admin reviews it.</p>;
  if (state?.ok) return <FormMessage state={state} />;
  return (
    <form action={action} className="flex flex-wrap items-center gap-2">
      <input type="hidden" name="measurementId" value={measurementId} />
      <label className="sr-only" htmlFor={`note-${measurementId}`}>
        Note
      </label>
      <input id={`note-${measurementId}`} name="note" placeholder="Note (needed to reject)" className="min-h-11 w-48 rounded-lg border border-line px-2 text-sm" />
      <button name="decision" value="accepted" disabled={pending} className="min-h-11 rounded-lg bg-ok px-3 text-sm font-semibold text-white disabled:opacity-50">
        Accept
      </button>
      <button name="decision" value="rejected" disabled={pending} className="min-h-11 rounded-lg border border-bad/50 bg-white px-3 text-sm font-semibold text-bad disabled:opacity-50">
        Reject
      </button>
      <FormMessage state={state} />
    </form>
  );
}
