"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

export function NavLinks({ items }: { items: { href: string; label: string; hint: string }[] }) {
  const pathname = usePathname();
  return (
    <ul className="flex flex-col gap-1">
      {items.map((item) => {
        const active = item.href === "/" ? pathname === "/" : pathname === item.href || pathname.startsWith(item.href + "/");
        return (
          <li key={item.href}>
            <Link
              href={item.href}
              title={item.hint}
              aria-current={active ? "page" : undefined}
              className={`flex min-h-11 items-center gap-3 rounded-lg px-3 text-[15px] font-medium transition-colors ${
                active ? "bg-white text-ink shadow-sm" : "text-white/80 hover:bg-white/10 hover:text-white"
              }`}
            >
              <span aria-hidden className={`h-2.5 w-2.5 rounded-full ${active ? "spectral-strip" : "bg-white/30"}`} />
              {item.label}
            </Link>
          </li>
        );
      })}
    </ul>
  );
}
