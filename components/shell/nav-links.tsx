"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useEffect, useRef } from "react";
import type { NavGroup } from "./nav-items";

function isActive(href: string, pathname: string) {
  return href === "/" ? pathname === "/" : pathname === href || pathname.startsWith(href + "/");
}

/**
 * The wide-screen navigation: one row, grouped by the lab day (Measure, Look up, Choose). The current
 * area is marked by an ink bar under it and by weight, not by colour; aria-current names it for
 * screen readers.
 */
export function NavRow({ groups }: { groups: NavGroup[] }) {
  const pathname = usePathname();
  return (
    <ul className="flex items-stretch gap-x-5">
      {groups.map((group) => (
        <li key={group.label} className="flex items-stretch gap-x-1">
          <span className="self-center pr-1 font-mono text-[11px] text-ink-soft" aria-hidden>
            {group.label}
          </span>
          <ul className="flex items-stretch" aria-label={group.label}>
            {group.items.map((item) => {
              const active = isActive(item.href, pathname);
              return (
                <li key={item.href} className="flex">
                  <Link
                    href={item.href}
                    title={item.hint}
                    aria-current={active ? "page" : undefined}
                    className={`relative flex min-h-11 items-center px-2.5 text-[15px] ${
                      active ? "font-bold text-ink after:absolute after:inset-x-2 after:bottom-0 after:h-[3px] after:bg-ink" : "text-ink-soft hover:text-ink hover:underline"
                    }`}
                  >
                    {item.label}
                  </Link>
                </li>
              );
            })}
          </ul>
        </li>
      ))}
    </ul>
  );
}

/** The phone menu: a disclosure that opens over the page and closes again when a page is chosen. */
export function PhoneMenu({ groups, children }: { groups: NavGroup[]; children: React.ReactNode }) {
  const pathname = usePathname();
  const ref = useRef<HTMLDetailsElement>(null);
  useEffect(() => {
    if (ref.current) ref.current.open = false;
  }, [pathname]);
  return (
    <details ref={ref} className="group lg:hidden">
      <summary className="flex min-h-11 cursor-pointer list-none items-center gap-2 rounded-md border border-ink px-3 text-sm font-semibold [&::-webkit-details-marker]:hidden">
        <span aria-hidden className="grid gap-[3px]">
          <span className="block h-[2px] w-4 bg-ink" />
          <span className="block h-[2px] w-4 bg-ink" />
          <span className="block h-[2px] w-4 bg-ink" />
        </span>
        Menu
      </summary>
      <div className="absolute inset-x-0 top-full z-30 hidden max-h-[calc(100dvh-3.5rem)] group-open:block overflow-y-auto border-b border-ink bg-white px-4 pb-5 pt-3 shadow-[0_12px_24px_rgba(0,0,0,0.18)]">
        <nav aria-label="Main">
          <div className="grid grid-cols-2 gap-x-4 gap-y-3">
            {groups.map((group) => (
              <div key={group.label}>
                <p className="font-mono text-[11px] text-ink-soft">{group.label}</p>
                <ul>
                  {group.items.map((item) => {
                    const active = isActive(item.href, pathname);
                    return (
                      <li key={item.href}>
                        <Link
                          href={item.href}
                          aria-current={active ? "page" : undefined}
                          className={`flex min-h-11 items-center gap-2 text-base ${active ? "font-bold" : ""}`}
                        >
                          <span aria-hidden className={`h-3 w-1 ${active ? "bg-ink" : "bg-transparent"}`} />
                          {item.label}
                        </Link>
                      </li>
                    );
                  })}
                </ul>
              </div>
            ))}
          </div>
        </nav>
        {children}
      </div>
    </details>
  );
}
