export type ImportSummary = { rows: number; good: number; problems: { line: number; column: string; message: string }[]; moreProblems: number; preview: Record<string, unknown>[]; imported?: number };

/** What a checked CSV import shows: every problem by line and column, then the first good rows. */
export function ImportReport({ summary, previewTitle }: { summary: ImportSummary; previewTitle: string }) {
  return (
    <>
      {summary.problems.length > 0 && (
        <section aria-label="Problems by line" className="rounded-lg border border-bad/40 bg-white p-4">
          <h2 className="mb-2 text-sm font-semibold text-bad">Problems ({summary.problems.length + summary.moreProblems})</h2>
          <table className="w-full text-left text-sm" data-testid="import-problems">
            <thead className="text-xs text-ink-soft">
              <tr>
                <th className="py-1 pr-3">Line</th>
                <th className="py-1 pr-3">Column</th>
                <th className="py-1">Problem</th>
              </tr>
            </thead>
            <tbody>
              {summary.problems.map((p, i) => (
                <tr key={i} className="border-t border-line align-top" data-testid="import-problem">
                  <td className="py-1 pr-3 tabular-nums">{p.line}</td>
                  <td className="py-1 pr-3 font-mono text-xs">{p.column}</td>
                  <td className="py-1">{p.message}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {summary.moreProblems > 0 && <p className="mt-1 text-xs text-ink-soft">and {summary.moreProblems} more; fix these first.</p>}
        </section>
      )}
      {summary.preview.length > 0 && (
        <section aria-label="Preview of the good rows" className="overflow-x-auto rounded-lg border border-line bg-white p-4">
          <h2 className="mb-2 text-sm font-semibold">{previewTitle}</h2>
          <table className="w-full text-left text-xs">
            <thead className="text-ink-soft">
              <tr>
                {Object.keys(summary.preview[0]).map((k) => (
                  <th key={k} className="py-1 pr-3">
                    {k}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {summary.preview.map((row, i) => (
                <tr key={i} className="border-t border-line">
                  {Object.values(row).map((v, j) => (
                    <td key={j} className="py-1 pr-3 font-mono">
                      {typeof v === "object" ? JSON.stringify(v) : String(v ?? "—")}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      )}
    </>
  );
}

/** The CSV file chooser of the imports: reads the chosen file as text in the browser. */
export function CsvFileField({ onLoad }: { onLoad: (name: string, text: string) => void }) {
  return (
    <div>
      <label htmlFor="csv-file" className="block text-sm font-semibold">
        CSV file
      </label>
      <input
        id="csv-file"
        type="file"
        accept=".csv,text/csv"
        data-testid="csv-file"
        onChange={async (e) => {
          const f = e.target.files?.[0];
          onLoad(f?.name ?? "", f ? await f.text() : "");
        }}
        className="mt-1 block text-sm"
      />
    </div>
  );
}
