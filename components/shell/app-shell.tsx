import Link from "next/link";
import { signOutAction } from "@/app/actions/auth";
import type { AuthUser } from "@/lib/auth/service";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { navFor } from "./nav-items";
import { NavLinks } from "./nav-links";

export function AppShell({ user, children }: { user: AuthUser; children: React.ReactNode }) {
  const items = navFor(user.role);
  return (
    <div className="min-h-dvh lg:grid lg:grid-cols-[15rem_1fr]">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:px-3 focus:py-2">
        Skip to content
      </a>
      <aside className="bg-ink text-white lg:sticky lg:top-0 lg:h-dvh">
        <details className="group lg:hidden" >
          <summary className="flex min-h-14 cursor-pointer list-none items-center justify-between px-4">
            <Brand />
            <span className="rounded-md border border-white/30 px-3 py-1 text-sm">Menu</span>
          </summary>
          <nav aria-label="Main" className="px-3 pb-4">
            <NavLinks items={items} />
          </nav>
        </details>
        <div className="hidden h-full flex-col px-3 py-5 lg:flex">
          <div className="px-3 pb-6">
            <Brand />
          </div>
          <nav aria-label="Main" className="flex-1">
            <NavLinks items={items} />
          </nav>
          <p className="px-3 text-xs leading-relaxed text-white/50">
            Screen colours are approximations; decisions rest on the measured CIELAB values.
          </p>
        </div>
      </aside>
      <div className="flex min-w-0 flex-col">
        <header className="no-print sticky top-0 z-10 flex flex-wrap items-center gap-3 border-b border-line bg-paper/95 px-4 py-3 backdrop-blur lg:px-8">
          <form action="/catalogue" role="search" className="order-last flex w-full min-w-0 items-center gap-2 sm:order-none sm:w-auto sm:flex-1">
            <label htmlFor="top-search" className="sr-only">
              Find a dye by name, code, CAS number or class
            </label>
            <input
              id="top-search"
              name="q"
              type="search"
              placeholder="Find a dye: name, code, CAS, class…"
              className="min-h-11 w-full max-w-md rounded-lg border border-line bg-white px-3 text-base"
            />
          </form>
          <div className="ml-auto flex items-center gap-3 text-sm">
            <Link href="/account" className="flex min-h-11 items-center gap-2 rounded-lg px-2 hover:bg-paper-deep" data-testid="current-user">
              <span className="font-medium">{user.name}</span>
              <span className="rounded-full bg-accent-soft px-2 py-0.5 text-xs font-semibold text-accent" data-testid="current-role">
                {ROLE_LABELS[user.role]}
              </span>
            </Link>
            <form action={signOutAction}>
              <button type="submit" className="min-h-11 rounded-lg border border-line bg-white px-3 font-medium hover:bg-paper-deep">
                Sign out
              </button>
            </form>
          </div>
        </header>
        <main id="main" className="mx-auto w-full max-w-7xl flex-1 px-4 py-6 lg:px-8">
          {children}
        </main>
      </div>
    </div>
  );
}

function Brand() {
  return (
    <Link href="/" className="flex items-center gap-2.5 text-lg font-bold tracking-tight text-white">
      <span aria-hidden className="spectral-strip inline-block h-7 w-3 rounded-sm" />
      Solvatlas
    </Link>
  );
}
