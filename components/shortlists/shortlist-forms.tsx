"use client";

import Link from "next/link";
import { useActionState } from "react";
import { addToShortlistAction, createShortlistAction, removeFromShortlistAction, shareShortlistAction, updateShortlistNoteAction } from "@/app/actions/shortlists";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

export function CreateShortlistForm({ dyeId }: { dyeId?: string }) {
  const [state, action] = useActionState(createShortlistAction, null);
  const e = state?.fieldErrors ?? {};
  const createdId = state?.ok ? (state.data?.id as string | undefined) : undefined;
  const v = (state?.ok === false && state.values) || {};
  return (
    <form action={action} className="space-y-3" noValidate aria-label="New shortlist">
      {dyeId && <input type="hidden" name="dyeId" value={dyeId} />}
      <Field label="Name of a new shortlist" name="name" error={e.name}>
        <TextInput name="name" placeholder="e.g. Moisture indicator, spring batch" defaultValue={v.name ?? ""} error={e.name} />
      </Field>
      <Field label={dyeId ? "Note on this dye (optional)" : "Notes (optional)"} name={dyeId ? "note" : "notes"} error={e.notes ?? e.note}>
        <TextInput name={dyeId ? "note" : "notes"} defaultValue={(dyeId ? v.note : v.notes) ?? ""} error={e.notes ?? e.note} />
      </Field>
      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton pendingText="Creating…">{dyeId ? "Create and add" : "Create shortlist"}</SubmitButton>
        <FormMessage state={state} />
        {createdId && (
          <Link href={`/shortlists/${createdId}`} className="text-sm font-semibold text-accent">
            Open the shortlist
          </Link>
        )}
      </div>
    </form>
  );
}

export function AddToShortlistForm({ dyeId, lists }: { dyeId: string; lists: { id: string; name: string }[] }) {
  const [state, action] = useActionState(addToShortlistAction, null);
  const e = state?.fieldErrors ?? {};
  if (lists.length === 0) return null;
  return (
    <form action={action} className="space-y-3" noValidate aria-label="Add to a shortlist">
      <input type="hidden" name="dyeId" value={dyeId} />
      <Field label="Add to one of your shortlists" name="shortlistId" error={e.shortlistId}>
        <select id="shortlistId" name="shortlistId" className="min-h-11 w-full rounded-md border border-field bg-white px-3">
          {lists.map((l) => (
            <option key={l.id} value={l.id}>
              {l.name}
            </option>
          ))}
        </select>
      </Field>
      <Field label="Note (optional)" name="add-note" error={e.note}>
        <input id="add-note" name="note" className="min-h-11 w-full rounded-md border border-field bg-white px-3" placeholder="why this dye" />
      </Field>
      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton pendingText="Adding…">Add to shortlist</SubmitButton>
        <FormMessage state={state} />
        {state?.ok && typeof state.data?.id === "string" && (
          <Link href={`/shortlists/${state.data.id}`} className="text-sm font-semibold text-accent">
            Open the shortlist
          </Link>
        )}
      </div>
    </form>
  );
}

export function ItemNoteForm({ itemId, note, code }: { itemId: string; note: string; code: string }) {
  const [state, action] = useActionState(updateShortlistNoteAction, null);
  return (
    <form action={action} className="flex flex-wrap items-center gap-2" aria-label={`Note on ${code}`}>
      <input type="hidden" name="itemId" value={itemId} />
      <label htmlFor={`note-${itemId}`} className="sr-only">
        Note on {code}
      </label>
      <input id={`note-${itemId}`} name="note" defaultValue={note} placeholder="note" className="min-h-11 min-w-48 flex-1 rounded-md border border-field bg-white px-3 text-sm" />
      <SubmitButton variant="secondary" pendingText="Saving…">
        Save note
      </SubmitButton>
      <FormMessage state={state} />
    </form>
  );
}

export function RemoveItemForm({ itemId, code }: { itemId: string; code: string }) {
  const [state, action] = useActionState(removeFromShortlistAction, null);
  return (
    <form action={action} aria-label={`Remove ${code}`}>
      <input type="hidden" name="itemId" value={itemId} />
      <SubmitButton variant="danger" pendingText="Removing…">
        Remove
      </SubmitButton>
      {state && !state.ok && <FormMessage state={state} />}
    </form>
  );
}

export function ShareShortlistForm({ shortlistId }: { shortlistId: string }) {
  const [state, action] = useActionState(shareShortlistAction, null);
  const e = state?.fieldErrors ?? {};
  const v = (state?.ok === false && state.values) || {};
  return (
    <form action={action} className="space-y-3" noValidate aria-label="Share by e-mail">
      <input type="hidden" name="shortlistId" value={shortlistId} />
      <Field label="Colleague's e-mail" name="email" error={e.email}>
        <TextInput name="email" type="email" autoComplete="off" defaultValue={v.email ?? ""} error={e.email} />
      </Field>
      <Field label="Message (optional)" name="message" error={e.message}>
        <TextArea name="message" defaultValue={v.message ?? ""} error={e.message} />
      </Field>
      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton pendingText="Sending…">Send link</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
