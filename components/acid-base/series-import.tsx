"use client";

import Link from "next/link";
import { useActionState, useState } from "react";
import { importPhSeriesAction } from "@/app/actions/ph-series";
import { Field, Select, TextInput } from "@/components/ui/field";
import { CsvFileField, ImportReport, type ImportSummary } from "@/components/imports/import-report";
import { PH_SERIES_COLUMNS } from "@/lib/import/columns";
import { Options, type Option } from "./medium-picker";


/**
 * A pH series from a CSV file: dye and medium chosen here, one vial per row. The file is checked row
 * by row first (problems by line and column); importing stores the colours and the series only when
 * every row is good.
 */
export function SeriesImport({ dyes, solvents }: { dyes: Option[]; solvents: Option[] }) {
  const [state, action, pending] = useActionState(importPhSeriesAction, null);
  const [csv, setCsv] = useState("");
  const [fileName, setFileName] = useState("");
  const summary = (state?.data as (ImportSummary & { id?: string }) | undefined) ?? null;
  const v = state?.values ?? {};
  const errors = state?.fieldErrors ?? {};
  return (
    <div className="space-y-4">
      <form action={action} className="space-y-4 border border-line bg-white p-4" aria-label="Import a pH series">
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          <Field label="Dye" name="dyeId" error={errors.dyeId}>
            <Select name="dyeId" defaultValue={v.dyeId ?? ""} error={errors.dyeId}>
              <Options items={dyes} empty="choose a dye" />
            </Select>
          </Field>
          <Field label="Series name" name="name" error={errors.name}>
            <TextInput name="name" defaultValue={v.name ?? ""} placeholder="Water, universal buffer, 23 °C" error={errors.name} />
          </Field>
          <Field label="Instrument (when the file has no instrument column)" name="instrument">
            <TextInput name="instrument" defaultValue={v.instrument ?? ""} placeholder="spectrophotometer 1, 10 mm cell" />
          </Field>
          <Field label="Solvent" name="solventId" error={errors.solventId}>
            <Select name="solventId" defaultValue={v.solventId ?? ""} error={errors.solventId}>
              <Options items={solvents} empty="choose a solvent" />
            </Select>
          </Field>
          <Field label="Second solvent (blends only)" name="secondSolventId" error={errors.secondSolventId}>
            <Select name="secondSolventId" defaultValue={v.secondSolventId ?? ""}>
              <Options items={solvents} empty="none (neat solvent)" />
            </Select>
          </Field>
          <Field label="Its mole fraction x₂" name="secondSolventMoleFraction" error={errors.secondSolventMoleFraction}>
            <TextInput name="secondSolventMoleFraction" inputMode="decimal" defaultValue={v.secondSolventMoleFraction ?? ""} error={errors.secondSolventMoleFraction} />
          </Field>
          <Field label="Ionic strength (mol/L)" name="ionicStrengthMolL" hint="Leave empty when not recorded." error={errors.ionicStrengthMolL}>
            <TextInput name="ionicStrengthMolL" inputMode="decimal" defaultValue={v.ionicStrengthMolL ?? ""} error={errors.ionicStrengthMolL} />
          </Field>
        </div>
        <p className="text-xs text-ink-soft">
          Columns (header row, any order): <code className="break-all">{PH_SERIES_COLUMNS.join(",")}</code>. pH, L, a, b and white_point (D65 or D50) are needed in every row; observer is the CIE
          1931 2° one (write 2); D50 colours are adapted to D65 (Bradford). Without acid_base a vial counts as acid below pH 6, base above pH 8 and neutral between (our
          convention). The colours are stored like instrument measurements and wait for review; the pKa is fitted from the accepted ones.
        </p>
        <CsvFileField
          onLoad={(name, text) => {
            setFileName(name);
            setCsv(text);
          }}
        />
        <input type="hidden" name="csv" value={csv} />
        <div className="flex flex-wrap gap-2">
          <button name="mode" value="preview" disabled={pending || !csv} className="min-h-11 rounded-md border border-field bg-white px-4 text-sm font-semibold disabled:opacity-40">
            Check the file
          </button>
          <button name="mode" value="all" disabled={pending || !csv} className="min-h-11 rounded-md bg-ink px-4 text-sm font-semibold text-white disabled:opacity-40">
            Import the series
          </button>
        </div>
        {state && (
          <p role={state.ok ? "status" : "alert"} className={`text-sm ${state.ok ? "text-ok" : "text-bad"}`} data-testid="import-message">
            {fileName && `${fileName}: `}
            {state.message}
            {summary?.id && (
              <>
                {" "}
                <Link href={`/acid-base/${encodeURIComponent(summary.id)}`}>Open the series</Link>
              </>
            )}
          </p>
        )}
      </form>
      {summary && <ImportReport summary={summary} previewTitle={`${summary.imported !== undefined ? "Imported" : "Good rows"} (first ${summary.preview.length}): CIELAB D65 as stored`} />}
    </div>
  );
}
