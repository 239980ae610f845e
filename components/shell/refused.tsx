import Link from "next/link";
import type { Role } from "@/db/schema";
import { describeAllowed, ROLE_LABELS } from "@/lib/auth/roles";
import type { AuthUser } from "@/lib/auth/service";

export function Refused({ user, allowed, area }: { user: AuthUser; allowed: readonly Role[]; area: string }) {
  return (
    <div role="alert" data-testid="refused" className="mx-auto mt-10 max-w-xl border border-l-4 border-bad bg-white p-8">
      <p className="text-sm font-semibold text-bad">Not available to your role</p>
      <h1 className="mt-2 text-2xl font-bold">{area} is for {describeAllowed(allowed)}</h1>
      <p className="mt-3 text-ink-soft">
        You are signed in as {user.name}, a {ROLE_LABELS[user.role].toLowerCase()}. If you need this page for your work, ask an admin of your lab to change your role.
      </p>
      <Link href="/" className="mt-6 inline-flex min-h-11 items-center rounded-md bg-ink px-4 font-semibold text-white">
        Back to the overview
      </Link>
    </div>
  );
}
