import Link from "next/link";

const TABS = [
  { key: "colour", href: "/search", label: "By colour" },
  { key: "shift", href: "/search/shift", label: "By shift between conditions" },
  { key: "ph", href: "/search/ph", label: "By pH transition" },
] as const;

export function SearchTabs({ current }: { current: (typeof TABS)[number]["key"] }) {
  return (
    <nav aria-label="Kinds of search" className="mb-4 flex flex-wrap gap-2">
      {TABS.map((t) => (
        <Link key={t.key} href={t.href} aria-current={t.key === current ? "page" : undefined} className={`rounded-lg px-3 py-2 text-sm font-medium ${t.key === current ? "bg-accent text-white" : "border border-line bg-white text-ink hover:bg-paper-deep"}`}>
          {t.label}
        </Link>
      ))}
    </nav>
  );
}
