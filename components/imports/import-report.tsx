import { ProblemTable } from "./problem-table";

export type ImportSummary = { rows: number; good: number; problems: { line: number; column: string; message: string }[]; moreProblems: number; preview: Record<string, unknown>[]; imported?: number };

/** What a checked CSV import shows: every problem by line and column, then the first good rows. */
export function ImportReport({ summary, previewTitle }: { summary: ImportSummary; previewTitle: string }) {
  return (
    <>
      <ProblemTable problems={summary.problems} more={summary.moreProblems} />
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
