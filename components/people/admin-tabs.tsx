import Link from "next/link";

const TABS = [
  { href: "/people", label: "Accounts" },
  { href: "/people/mailbox", label: "Local mailbox" },
  { href: "/people/audit", label: "Audit log" },
  { href: "/people/backup", label: "Backups" },
];

export function AdminTabs({ current }: { current: string }) {
  return (
    <nav aria-label="Admin" className="mb-5 flex gap-1 border-b border-line">
      {TABS.map((t) => (
        <Link
          key={t.href}
          href={t.href}
          aria-current={t.href === current ? "page" : undefined}
          className={`-mb-px min-h-11 border-b-2 px-4 py-2.5 text-sm font-medium ${t.href === current ? "border-accent text-accent" : "border-transparent text-ink-soft hover:text-ink"}`}
        >
          {t.label}
        </Link>
      ))}
    </nav>
  );
}
