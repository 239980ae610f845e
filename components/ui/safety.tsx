export function SafetyNotice({ solvents }: { solvents?: { name: string; cautions: string }[] }) {
  const listed = (solvents ?? []).filter((s) => s.cautions);
  return (
    <aside aria-label="Safety" className="rounded-lg border border-warn/40 bg-amber-50 px-4 py-3 text-sm text-[#5c3a00]">
      <p className="font-semibold">Before you handle solvents, dyes or UV lamps</p>
      <p className="mt-1">
        Work in a fume hood, wear gloves suited to the solvent and eye protection, read each supplier&apos;s safety data sheet, and never look into a UV lamp. Dyes may be skin
        sensitizers; DMSO carries dissolved dyes through skin. Local regulations and your lab&apos;s safety officer take precedence over anything shown here.
      </p>
      {listed.length > 0 && (
        <ul className="mt-2 list-disc space-y-0.5 pl-5">
          {listed.map((s) => (
            <li key={s.name}>
              <strong>{s.name}:</strong> {s.cautions}
            </li>
          ))}
        </ul>
      )}
    </aside>
  );
}
