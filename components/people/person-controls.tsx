"use client";

import { useActionState } from "react";
import { setActiveAction, setRoleAction } from "@/app/actions/people";
import type { Role } from "@/db/schema";
import { FormMessage } from "@/components/ui/form-status";

export function PersonControls({ userId, role, active, self }: { userId: string; role: Role; active: boolean; self: boolean }) {
  const [roleState, roleAction, rolePending] = useActionState(setRoleAction, null);
  const [activeState, activeAction, activePending] = useActionState(setActiveAction, null);
  return (
    <div className="flex flex-wrap items-center gap-2">
      <form action={roleAction} className="flex items-center gap-2">
        <input type="hidden" name="userId" value={userId} />
        <label className="sr-only" htmlFor={`role-${userId}`}>
          Role
        </label>
        <select id={`role-${userId}`} name="role" defaultValue={role} disabled={self} className="min-h-11 rounded-lg border border-line bg-white px-2 text-sm">
          <option value="admin">Admin</option>
          <option value="chemist">Chemist</option>
          <option value="formulator">Formulator</option>
        </select>
        <button disabled={self || rolePending} className="min-h-11 rounded-lg border border-line px-3 text-sm font-medium disabled:opacity-40">
          Change role
        </button>
      </form>
      <form action={activeAction}>
        <input type="hidden" name="userId" value={userId} />
        <input type="hidden" name="active" value={active ? "false" : "true"} />
        <button disabled={self || activePending} className={`min-h-11 rounded-lg border px-3 text-sm font-medium disabled:opacity-40 ${active ? "border-bad/50 text-bad" : "border-ok/50 text-ok"}`}>
          {active ? "Deactivate" : "Reactivate"}
        </button>
      </form>
      <FormMessage state={roleState} />
      <FormMessage state={activeState} />
    </div>
  );
}
