"use client";

import { useActionState, useState } from "react";
import { importCsvAction } from "@/app/actions/imports";
import { DYE_COLUMNS, MEASUREMENT_COLUMNS } from "@/lib/import/columns";
import { CsvFileField, ImportReport, type ImportSummary as Summary } from "./import-report";


/** Choose a CSV, see every row checked (problems by line and column), then import all of it or only its good rows. */
export function CsvImport() {
  const [kind, setKind] = useState<"dyes" | "measurements">("measurements");
  const [csv, setCsv] = useState("");
  const [fileName, setFileName] = useState("");
  const [state, action, pending] = useActionState(importCsvAction, null);
  const summary = (state?.data as Summary | undefined) ?? null;
  const checked = summary && summary.imported === undefined;
  return (
    <div className="space-y-4">
      <form action={action} className="space-y-3 rounded-lg border border-line bg-white p-4">
        <fieldset className="flex flex-wrap gap-4 text-sm">
          <legend className="mb-1 font-semibold">The file holds</legend>
          {(["measurements", "dyes"] as const).map((k) => (
            <label key={k} className="flex items-center gap-2">
              <input type="radio" name="kind" value={k} checked={kind === k} onChange={() => setKind(k)} />
              {k === "dyes" ? "dyes for the catalogue" : "colours measured with an instrument (CIELAB)"}
            </label>
          ))}
        </fieldset>
        <p className="text-xs text-ink-soft">
          Columns (header row, any order): <code className="break-all">{(kind === "dyes" ? DYE_COLUMNS : MEASUREMENT_COLUMNS).join(",")}</code>.{" "}
          {kind === "dyes"
            ? "code, name and class are needed; synonyms separated by semicolons."
            : "dye (code), solvent (name or synonym), L, a, b, white_point (D65 or D50) and instrument are needed; observer is the CIE 1931 2° one (write 2); D50 colours are adapted to D65 (Bradford). Imported colours wait for review."}
        </p>
        <CsvFileField
          onLoad={(name, text) => {
            setFileName(name);
            setCsv(text);
          }}
        />
        <input type="hidden" name="csv" value={csv} />
        <div className="flex flex-wrap gap-2">
          <button name="mode" value="preview" disabled={pending || !csv} className="min-h-11 rounded-md border border-line bg-white px-4 text-sm font-semibold disabled:opacity-40">
            Check the file
          </button>
          {checked && (
            <>
              <button name="mode" value="all" disabled={pending || summary.problems.length > 0} className="min-h-11 rounded-md bg-accent px-4 text-sm font-semibold text-white disabled:opacity-40">
                Import all {summary.rows} rows
              </button>
              {summary.problems.length > 0 && summary.good > 0 && (
                <button name="mode" value="good" disabled={pending} className="min-h-11 rounded-md border border-accent px-4 text-sm font-semibold text-accent disabled:opacity-40">
                  Import only the {summary.good} good rows
                </button>
              )}
            </>
          )}
        </div>
        {state && (
          <p role={state.ok ? "status" : "alert"} className={`text-sm ${state.ok ? "text-ok" : "text-bad"}`} data-testid="import-message">
            {fileName && `${fileName}: `}
            {state.message}
          </p>
        )}
      </form>
      {summary && <ImportReport summary={summary} previewTitle={`${summary.imported !== undefined ? "Imported" : "Good rows"} (first ${summary.preview.length})${kind === "measurements" ? ": CIELAB D65 as stored" : ""}`} />}
    </div>
  );
}
