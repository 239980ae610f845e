"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { findDyeById } from "@/db/queries/dyes";
import { takeRateSlot } from "@/db/queries/rate";
import { findUserByEmail } from "@/db/queries/users";
import { addShortlistItem, createShortlist, findShortlist, findShortlistItem, recordShortlistShare, removeShortlistItem, updateShortlistItemNote } from "@/db/queries/shortlists";
import { formAction } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import type { AuthUser } from "@/lib/auth/service";
import { newId } from "@/lib/auth/tokens";
import { appUrl } from "@/lib/config/env";
import { AppError } from "@/lib/errors";
import { send } from "@/lib/mail";

const id = (what: string) => z.string({ error: `${what} is missing; reload the page.` }).min(1, `${what} is missing; reload the page.`).max(100);
const note = z.string().max(2000, "A note is at most 2000 characters.").optional().default("");

/** Everyone in the lab reads every shortlist; only its owner or an admin changes it. */
function mayEdit(user: AuthUser, ownerId: string) {
  if (user.id !== ownerId && user.role !== "admin") throw new AppError("forbidden", "Only the person who keeps this shortlist (or an admin) may change it; make your own shortlist instead.");
}

export const createShortlistAction = formAction(
  {
    access: ANY_ROLE,
    schema: z.object({
      name: z.string().trim().min(1, "Give the shortlist a name.").max(120, "A name is at most 120 characters."),
      notes: z.string().max(4000, "Notes are at most 4000 characters.").optional().default(""),
      dyeId: z.string().max(100).optional(),
      note,
    }),
  },
  async ({ name, notes, dyeId, note }, { user }) => {
    const handle = db();
    if (dyeId && !findDyeById(handle, { id: dyeId })) throw new AppError("not_found", "This dye no longer exists.");
    const list = createShortlist(handle, { actorId: user.id, id: newId("sl"), name, notes });
    if (dyeId) addShortlistItem(handle, { actorId: user.id, id: newId("sli"), shortlistId: list.id, dyeId, note });
    revalidatePath("/shortlists");
    return { ok: true, message: dyeId ? `Created “${name}” with this dye.` : `Created “${name}”.`, data: { id: list.id } };
  },
);

export const addToShortlistAction = formAction({ access: ANY_ROLE, schema: z.object({ shortlistId: id("The shortlist"), dyeId: id("The dye"), note }) }, async ({ shortlistId, dyeId, note }, { user }) => {
  const handle = db();
  const found = findShortlist(handle, { id: shortlistId });
  if (!found) throw new AppError("not_found", "This shortlist no longer exists.");
  mayEdit(user, found.list.ownerId);
  const dye = findDyeById(handle, { id: dyeId });
  if (!dye) throw new AppError("not_found", "This dye no longer exists.");
  const added = addShortlistItem(handle, { actorId: user.id, id: newId("sli"), shortlistId, dyeId, note });
  revalidatePath(`/shortlists/${shortlistId}`);
  return { ok: true, message: added ? `Added ${dye.code} to “${found.list.name}”.` : `${dye.code} is already on “${found.list.name}”.`, data: { id: shortlistId } };
});

export const removeFromShortlistAction = formAction({ access: ANY_ROLE, schema: z.object({ itemId: id("The entry") }) }, async ({ itemId }, { user }) => {
  const handle = db();
  const found = findShortlistItem(handle, { id: itemId });
  if (!found) throw new AppError("not_found", "This entry was already removed.");
  mayEdit(user, found.list.ownerId);
  removeShortlistItem(handle, { actorId: user.id, id: itemId });
  revalidatePath(`/shortlists/${found.list.id}`);
  return { ok: true, message: "Removed." };
});

export const updateShortlistNoteAction = formAction({ access: ANY_ROLE, schema: z.object({ itemId: id("The entry"), note }) }, async ({ itemId, note }, { user }) => {
  const handle = db();
  const found = findShortlistItem(handle, { id: itemId });
  if (!found) throw new AppError("not_found", "This entry no longer exists.");
  mayEdit(user, found.list.ownerId);
  updateShortlistItemNote(handle, { actorId: user.id, id: itemId, note });
  revalidatePath(`/shortlists/${found.list.id}`);
  return { ok: true, message: "Note saved." };
});

/** Shares per person per hour (common practice, no source): the app sends mail only to its own people. */
const SHARES_PER_HOUR = 20;

export const shareShortlistAction = formAction(
  {
    access: ANY_ROLE,
    schema: z.object({
      shortlistId: id("The shortlist"),
      email: z.email({ error: "Give the colleague's e-mail address, e.g. name@lab.example." }).max(200),
      message: z.string().max(2000, "The message is at most 2000 characters.").optional().default(""),
    }),
  },
  async ({ shortlistId, email, message }, { user }) => {
    const handle = db();
    const found = findShortlist(handle, { id: shortlistId });
    if (!found) throw new AppError("not_found", "This shortlist no longer exists.");
    const colleague = findUserByEmail(handle, { email });
    if (!colleague || colleague.deactivatedAt !== null) {
      throw new AppError("invalid_input", "Shortlists can be shared only with people of your lab who have an active Solvatlas account. Check the address, or ask an admin to invite them.", {
        email: ["Not a person of this lab."],
      });
    }
    if (!takeRateSlot(handle, { kind: "share-by-user", key: user.id, max: SHARES_PER_HOUR, windowMs: 3600 * 1000 })) {
      throw new AppError("rate_limited", `You have shared ${SHARES_PER_HOUR} shortlists in the last hour, the most allowed. Try again later.`);
    }
    const link = `${appUrl()}/shortlists/${shortlistId}`;
    await send({
      to: colleague.email,
      // No person-written text in the subject: it is the part mail programs show before anyone opens it.
      subject: `${user.name} shared a Solvatlas shortlist with you`,
      text: `${user.name} shared a Solvatlas shortlist with you: “${found.list.name}”.\n\n${message ? `${message}\n\n` : ""}Open it here (sign in first): ${link}\n`,
    });
    recordShortlistShare(handle, { actorId: user.id, shortlistId, to: colleague.email });
    return { ok: true, message: `Sent the link to ${colleague.name} (${colleague.email}).` };
  },
);
