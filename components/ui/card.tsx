/** A sample card: white on the neutral surround, cut square, its title above a hairline. */
export function Card({ title, actions, children, className = "" }: { title?: React.ReactNode; actions?: React.ReactNode; children: React.ReactNode; className?: string }) {
  return (
    <section className={`min-w-0 border border-line bg-white p-4 sm:p-5 ${className}`}>
      {(title || actions) && (
        <div className="-mx-4 mb-4 flex flex-wrap items-center justify-between gap-3 border-b border-line px-4 pb-3 sm:-mx-5 sm:px-5">
          {title && <h2 className="text-base font-bold text-ink">{title}</h2>}
          {actions}
        </div>
      )}
      {children}
    </section>
  );
}

/** The page title, with an ink rule under it: the label on the sample sheet. */
export function PageHeader({ title, lead, actions }: { title: string; lead?: React.ReactNode; actions?: React.ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-x-4 gap-y-3 border-b-2 border-ink pb-3">
      <div className="min-w-0">
        <h1 className="text-2xl font-bold text-ink sm:text-[1.75rem]">{title}</h1>
        {lead && <p className="mt-1 max-w-3xl text-sm text-ink-soft">{lead}</p>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </header>
  );
}

const NOTICE_TONES = {
  info: { box: "border-line bg-white text-ink", glyph: "i" },
  caution: { box: "border-warn bg-amber-50 text-[#5c3a00]", glyph: "!" },
  error: { box: "border-bad bg-red-50 text-bad", glyph: "×" },
  ok: { box: "border-ok bg-emerald-50 text-ok", glyph: "✓" },
} as const;

/** A message box; its tone is also carried by a glyph and (for errors) the alert role, never by colour alone. */
export function Notice({ tone = "info", title, children }: { tone?: "info" | "caution" | "error" | "ok"; title?: string; children: React.ReactNode }) {
  const t = NOTICE_TONES[tone];
  return (
    <div role={tone === "error" ? "alert" : "note"} className={`flex gap-3 border-l-4 border-y border-r px-4 py-3 text-sm ${t.box}`}>
      <span aria-hidden className="font-mono font-bold">
        {t.glyph}
      </span>
      <div className="min-w-0">
        {title && <p className="mb-1 font-semibold">{title}</p>}
        <div>{children}</div>
      </div>
    </div>
  );
}

const BADGE_TONES = {
  neutral: "border-line bg-paper text-ink-soft",
  accent: "border-ink bg-white text-ink",
  ok: "border-ok/50 bg-emerald-50 text-ok",
  warn: "border-warn/50 bg-amber-50 text-warn",
  bad: "border-bad/50 bg-red-50 text-bad",
} as const;

/** A small label. Badges always carry their meaning in words ("accepted", "pending"); the tone only repeats it. */
export function Badge({ children, tone = "neutral" }: { children: React.ReactNode; tone?: "neutral" | "accent" | "ok" | "warn" | "bad" }) {
  return <span className={`inline-flex items-center rounded-sm border px-1.5 py-px text-xs font-medium ${BADGE_TONES[tone]}`}>{children}</span>;
}
