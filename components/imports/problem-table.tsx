/** Problems found in an uploaded file, one row each with its line and column (line 0: a field of the form, not the file). */
export function ProblemTable({ problems, more = 0 }: { problems: { line: number; column: string; message: string }[]; more?: number }) {
  if (problems.length === 0) return null;
  return (
    <section aria-label="Problems by line" className="rounded-lg border border-bad/40 bg-white p-4">
      <h2 className="mb-2 text-sm font-semibold text-bad">Problems ({problems.length + more})</h2>
      <table className="w-full text-left text-sm" data-testid="import-problems">
        <thead className="text-xs text-ink-soft">
          <tr>
            <th className="py-1 pr-3">Line</th>
            <th className="py-1 pr-3">Column</th>
            <th className="py-1">Problem</th>
          </tr>
        </thead>
        <tbody>
          {problems.map((p, i) => (
            <tr key={i} className="border-t border-line align-top" data-testid="import-problem">
              <td className="py-1 pr-3 tabular-nums">{p.line === 0 ? "—" : p.line}</td>
              <td className="py-1 pr-3 font-mono text-xs">{p.column}</td>
              <td className="py-1">{p.message}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {more > 0 && <p className="mt-1 text-xs text-ink-soft">and {more} more; fix these first.</p>}
    </section>
  );
}
