"use client";

import Link from "next/link";
import { useActionState } from "react";
import { addToShortlistAction } from "@/app/actions/shortlists";

/**
 * Keeps one search hit on one of the person's shortlists without leaving the results; the note records
 * what the search found (colour, condition, ΔE00) so the shortlist remembers why the dye is there.
 */
export function KeepHit({ dyeId, code, note, lists }: { dyeId: string; code: string; note: string; lists: { id: string; name: string }[] }) {
  const [state, action, pending] = useActionState(addToShortlistAction, null);
  if (lists.length === 0) {
    return (
      <Link href="/shortlists" className="text-sm text-accent">
        Start a shortlist
      </Link>
    );
  }
  return (
    <form action={action} className="flex flex-wrap items-center gap-1" aria-label={`Keep ${code} on a shortlist`}>
      <input type="hidden" name="dyeId" value={dyeId} />
      <input type="hidden" name="note" value={note} />
      {lists.length === 1 ? (
        <input type="hidden" name="shortlistId" value={lists[0].id} />
      ) : (
        <select name="shortlistId" aria-label={`Shortlist for ${code}`} className="min-h-11 max-w-40 rounded-md border border-field bg-white px-2 text-sm">
          {lists.map((l) => (
            <option key={l.id} value={l.id}>
              {l.name}
            </option>
          ))}
        </select>
      )}
      <button type="submit" disabled={pending} className="min-h-11 rounded-md border border-field bg-white px-3 text-sm font-semibold hover:bg-paper disabled:opacity-50">
        {lists.length === 1 ? `Keep on “${lists[0].name}”` : "Keep"}
      </button>
      {state?.message && (
        <span role={state.ok ? "status" : "alert"} className={`text-xs ${state.ok ? "text-ok" : "text-bad"}`}>
          {state.ok ? "✓ " : "× "}
          {state.message}
        </span>
      )}
    </form>
  );
}
