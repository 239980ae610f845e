import Link from "next/link";
import { signOutAction } from "@/app/actions/auth";
import type { AuthUser } from "@/lib/auth/service";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { SwatchKey } from "@/components/ui/swatch";
import { navGroupsFor } from "./nav-items";
import { NavRow, PhoneMenu } from "./nav-links";
import { Mark } from "./mark";

/**
 * The signed-in frame. On a phone it is one 56 px row (mark, name, menu); the menu opens over the
 * page with the search, the areas and the account. On a wide screen: a bar with the search and the
 * account, and under it the areas in one row, grouped by the lab day.
 */
export function AppShell({ user, children }: { user: AuthUser; children: React.ReactNode }) {
  const groups = navGroupsFor(user.role);
  return (
    <div className="flex min-h-dvh flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:bg-white focus:px-3 focus:py-2">
        Skip to content
      </a>
      <header className="no-print sticky top-0 z-20 border-b border-ink bg-white">
        <div className="relative mx-auto flex h-14 max-w-[90rem] items-center gap-3 px-4 lg:px-8">
          <Brand />
          <form action="/catalogue" role="search" className="hidden min-w-0 flex-1 lg:flex">
            <label htmlFor="top-search" className="sr-only">
              Find a dye by name, code, CAS number or class
            </label>
            <input
              id="top-search"
              name="q"
              type="search"
              placeholder="Find a dye: name, code, CAS, class…"
              className="min-h-10 w-full max-w-md rounded-md border border-field bg-paper px-3 text-base placeholder:text-ink-soft"
            />
          </form>
          <div className="ml-auto hidden items-center gap-2 text-sm lg:flex">
            <Account user={user} />
            <SignOut />
          </div>
          <div className="ml-auto lg:hidden">
            <PhoneMenu groups={groups}>
              <form action="/catalogue" role="search" className="mt-4 flex gap-2 border-t border-line pt-4">
                <label htmlFor="menu-search" className="sr-only">
                  Find a dye by name, code, CAS number or class
                </label>
                <input id="menu-search" name="q" type="search" placeholder="Find a dye: name, code, CAS…" className="min-h-11 min-w-0 flex-1 rounded-md border border-field bg-paper px-3 text-base" />
                <button className="min-h-11 rounded-md bg-ink px-4 text-sm font-semibold text-white">Find</button>
              </form>
              <div className="mt-4 flex items-center justify-between gap-3 border-t border-line pt-4 text-sm">
                <Account user={user} />
                <SignOut />
              </div>
            </PhoneMenu>
          </div>
        </div>
        <nav aria-label="Main" className="hidden border-t border-line lg:block">
          <div className="mx-auto max-w-[90rem] px-6">
            <NavRow groups={groups} />
          </div>
        </nav>
      </header>
      <main id="main" className="mx-auto w-full min-w-0 max-w-[90rem] flex-1 px-4 py-6 lg:px-8">
        {children}
      </main>
      <footer className="no-print border-t border-line">
        <div className="mx-auto max-w-[90rem] px-4 py-4 lg:px-8">
          <SwatchKey />
        </div>
      </footer>
    </div>
  );
}

function Brand() {
  return (
    <Link href="/" className="flex shrink-0 items-center gap-2.5 text-lg font-bold text-ink no-underline">
      <Mark className="h-6 w-9" />
      Solvatlas
    </Link>
  );
}

function Account({ user }: { user: AuthUser }) {
  return (
    <Link href="/account" className="flex min-h-11 items-center gap-2 rounded-md px-2 hover:bg-paper" data-testid="current-user">
      <span className="font-medium">{user.name}</span>
      <span className="rounded-sm border border-ink px-1.5 py-px font-mono text-xs" data-testid="current-role">
        {ROLE_LABELS[user.role]}
      </span>
    </Link>
  );
}

function SignOut() {
  return (
    <form action={signOutAction}>
      <button type="submit" className="min-h-11 rounded-md border border-field bg-white px-3 font-medium hover:bg-paper">
        Sign out
      </button>
    </form>
  );
}
