export function Card({ title, actions, children, className = "" }: { title?: React.ReactNode; actions?: React.ReactNode; children: React.ReactNode; className?: string }) {
  return (
    <section className={`rounded-xl border border-line bg-white p-5 shadow-[0_1px_0_rgba(29,36,51,0.04)] ${className}`}>
      {(title || actions) && (
        <div className="mb-4 flex flex-wrap items-center justify-between gap-3">
          {title && <h2 className="text-base font-semibold text-ink">{title}</h2>}
          {actions}
        </div>
      )}
      {children}
    </section>
  );
}

export function PageHeader({ title, lead, actions }: { title: string; lead?: React.ReactNode; actions?: React.ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="text-2xl font-bold tracking-tight text-ink">{title}</h1>
        {lead && <p className="mt-1 max-w-3xl text-sm text-ink-soft">{lead}</p>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </header>
  );
}

export function Notice({ tone = "info", title, children }: { tone?: "info" | "caution" | "error" | "ok"; title?: string; children: React.ReactNode }) {
  const tones = {
    info: "border-line bg-paper-deep/60 text-ink",
    caution: "border-warn/40 bg-amber-50 text-[#5c3a00]",
    error: "border-bad/40 bg-red-50 text-bad",
    ok: "border-ok/40 bg-emerald-50 text-ok",
  } as const;
  return (
    <div role={tone === "error" ? "alert" : "note"} className={`rounded-lg border px-4 py-3 text-sm ${tones[tone]}`}>
      {title && <p className="mb-1 font-semibold">{title}</p>}
      <div>{children}</div>
    </div>
  );
}

export function Badge({ children, tone = "neutral" }: { children: React.ReactNode; tone?: "neutral" | "accent" | "ok" | "warn" | "bad" }) {
  const tones = {
    neutral: "bg-paper-deep text-ink-soft",
    accent: "bg-accent-soft text-accent",
    ok: "bg-emerald-50 text-ok",
    warn: "bg-amber-50 text-warn",
    bad: "bg-red-50 text-bad",
  } as const;
  return <span className={`inline-flex items-center rounded-full px-2 py-0.5 text-xs font-medium ${tones[tone]}`}>{children}</span>;
}
