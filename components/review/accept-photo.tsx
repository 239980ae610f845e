"use client";

import { useActionState } from "react";
import { acceptPhotoAction } from "@/app/actions/review";
import { FormMessage } from "@/components/ui/form-status";

/** "Accept all from this photo": only after the reviewer ticks that they checked every region; never their own. */
export function AcceptPhoto({ photoId, theirs, own }: { photoId: string; theirs: number; own: number }) {
  const [state, action, pending] = useActionState(acceptPhotoAction, null);
  if (state?.ok) return <FormMessage state={state} />;
  if (theirs === 0) {
    return <p className="text-sm text-ink-soft">{own > 0 ? `The ${own} waiting from this photo are your own: another chemist or an admin reviews them.` : "Nothing from this photo is waiting for review."}</p>;
  }
  return (
    <form action={action} className="space-y-2 rounded-lg border border-line bg-white p-3" data-testid="accept-photo">
      <input type="hidden" name="photoId" value={photoId} />
      <label className="flex items-start gap-2 text-sm">
        <input type="checkbox" name="checked" value="yes" className="mt-1 h-4 w-4" required />
        <span>I have checked every region on this photo against its vial, dye, solvent and condition, and the flags below.</span>
      </label>
      <label htmlFor="accept-all-note" className="sr-only">
        Note to the chemist (optional)
      </label>
      <input id="accept-all-note" name="note" placeholder="Note to the chemist (optional)" className="min-h-10 w-full rounded-md border border-line px-2 text-sm" />
      <button disabled={pending} className="min-h-11 rounded-md bg-ok px-4 text-sm font-semibold text-white disabled:opacity-50">
        Accept all {theirs} from this photo
      </button>
      {own > 0 && <p className="text-xs text-ink-soft">{own} of your own stay waiting for another reviewer.</p>}
      <FormMessage state={state} />
    </form>
  );
}
