"use client";

import { startTransition, useActionState, useState, type FormEvent } from "react";
import { useDropzone } from "react-dropzone";
import { uploadSpectrumAction } from "@/app/actions/spectra";
import { ProblemTable } from "@/components/imports/problem-table";
import { Field, Select, TextInput } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import type { SpectrumPreview } from "@/db/queries/spectra";
import { MAX_STEP_NM } from "@/lib/import/spectrum";
import { SpectraChart } from "./spectra-chart";

const MAX_BYTES = 5 * 1024 * 1024;
const ACCEPT = { "text/csv": [".csv"], "text/plain": [".txt", ".dat"], "text/tab-separated-values": [".tsv"] };

const EMPTY = {
  solvent: "",
  acidBase: "neutral",
  pH: "",
  additive: "",
  temperatureC: "",
  secondSolvent: "",
  secondSolventMoleFraction: "",
  concentrationUmolL: "20",
  pathLengthMm: "10",
  instrument: "",
};
type Fields = typeof EMPTY;

/**
 * Upload one absorbance spectrum for this dye: drop a CSV, say the condition, concentration, path length
 * and instrument, check it (every problem by line and column; a preview with λmax and colour), then save.
 */
export function SpectrumUpload({ dyeCode, solvents }: { dyeCode: string; solvents: { id: string; name: string }[] }) {
  const [fields, setFields] = useState<Fields>(EMPTY);
  const [file, setFile] = useState<{ name: string; text: string } | null>(null);
  const [refused, setRefused] = useState<string | null>(null);
  // A preview belongs to the file and fields it was made from; any change asks for a new check.
  const [checkedFor, setCheckedFor] = useState<string | null>(null);
  const [state, action, pending] = useActionState(uploadSpectrumAction, null);
  const set = (k: keyof Fields) => (e: { target: { value: string } }) => setFields((f) => ({ ...f, [k]: e.target.value }));
  const fingerprint = JSON.stringify([fields, file?.name, file?.text.length, file?.text.slice(0, 200)]);
  const data = state?.data as { preview?: SpectrumPreview; problems?: { line: number; column: string; message: string }[]; warnings?: string[]; saved?: boolean } | undefined;
  const preview = state?.ok && data?.preview && checkedFor === fingerprint ? data.preview : null;
  const e = state?.fieldErrors ?? {};

  // Dispatched by hand rather than through the form's action prop: React resets a form after its action,
  // which would put the chosen solvent back to "Choose" in the page while the state still holds it.
  const submit = (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    const data = new FormData(event.currentTarget);
    const submitter = (event.nativeEvent as SubmitEvent).submitter as HTMLButtonElement | null;
    data.set("mode", submitter?.value ?? "preview");
    setCheckedFor(fingerprint);
    startTransition(() => action(data));
  };

  const { getRootProps, getInputProps, isDragActive } = useDropzone({
    accept: ACCEPT,
    maxSize: MAX_BYTES,
    multiple: false,
    onDrop: async (accepted, rejections) => {
      if (rejections.length > 0) {
        const r = rejections[0];
        setRefused(r.errors[0]?.code === "file-too-large" ? `${r.file.name} is larger than 5 MB; send at most one row per 0.1 nm.` : `${r.file.name} is not a CSV or text file; export the spectrum as CSV.`);
        return;
      }
      const f = accepted[0];
      if (!f) return;
      setRefused(null);
      setFile({ name: f.name, text: await f.text() });
    },
  });

  return (
    <form onSubmit={submit} className="space-y-4" aria-label="Upload a spectrum" noValidate>
      <input type="hidden" name="dye" value={dyeCode} />
      <input type="hidden" name="csv" value={file?.text ?? ""} />
      <input type="hidden" name="fileName" value={file?.name ?? ""} />
      <div
        {...getRootProps({
          "aria-label": "Absorbance CSV file",
          className: `flex min-h-28 cursor-pointer flex-col items-center justify-center border-2 border-dashed px-6 py-6 text-center focus:outline-none focus-visible:ring-4 focus-visible:ring-ink/30 ${
            isDragActive ? "border-ink bg-paper-deep" : "border-line bg-paper/40 hover:bg-paper"
          }`,
        })}
        data-testid="spectrum-dropzone"
      >
        <input {...getInputProps()} data-testid="spectrum-input" />
        <p className="text-base font-semibold">{file ? file.name : isDragActive ? "Drop the file to read it" : "Drop an absorbance CSV here, or press Enter to choose it"}</p>
        <p className="mt-1 text-sm text-ink-soft">
          A header row naming the wavelength column (<code>wavelength_nm</code>; <code>wavelength_um</code> and <code>wavenumber_cm-1</code> are converted) and the decadic
          absorbance (<code>absorbance</code>), from 400 nm or below to 700 nm or above, at most {MAX_STEP_NM} nm apart.
        </p>
      </div>
      {refused && <Notice tone="error">{refused}</Notice>}
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <Field label="Solvent" name="solvent" error={e["condition.solvent"] ?? e.solvent}>
          <Select name="solvent" value={fields.solvent} onChange={set("solvent")} error={e["condition.solvent"] ?? e.solvent}>
            <option value="">Choose the solvent</option>
            {solvents.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </Select>
        </Field>
        <Field label="Acid or base" name="acidBase">
          <Select name="acidBase" value={fields.acidBase} onChange={set("acidBase")}>
            <option value="neutral">neutral</option>
            <option value="acid">acid</option>
            <option value="base">base</option>
          </Select>
        </Field>
        <Field label="pH (if measured)" name="pH" error={e.pH ?? e["condition.pH"]}>
          <TextInput name="pH" inputMode="decimal" value={fields.pH} onChange={set("pH")} error={e.pH ?? e["condition.pH"]} />
        </Field>
        <Field label="Acid or base added" name="additive" hint="e.g. 0.01 M HCl; empty for none">
          <TextInput name="additive" value={fields.additive} onChange={set("additive")} />
        </Field>
        <Field label="Second solvent (blend)" name="secondSolvent">
          <Select name="secondSolvent" value={fields.secondSolvent} onChange={set("secondSolvent")}>
            <option value="">none (neat solvent)</option>
            {solvents.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </Select>
        </Field>
        <Field label="Its mole fraction" name="secondSolventMoleFraction" error={e.secondSolventMoleFraction ?? e["condition.secondSolventMoleFraction"]}>
          <TextInput name="secondSolventMoleFraction" inputMode="decimal" value={fields.secondSolventMoleFraction} onChange={set("secondSolventMoleFraction")} disabled={!fields.secondSolvent} />
        </Field>
        <Field label="Temperature (°C)" name="temperatureC" error={e.temperatureC ?? e["condition.temperatureC"]}>
          <TextInput name="temperatureC" inputMode="decimal" value={fields.temperatureC} onChange={set("temperatureC")} />
        </Field>
        <Field label="Concentration of the dye (µmol/L)" name="concentrationUmolL" error={e.concentrationUmolL}>
          <TextInput name="concentrationUmolL" inputMode="decimal" value={fields.concentrationUmolL} onChange={set("concentrationUmolL")} error={e.concentrationUmolL} />
        </Field>
        <Field label="Cell path (mm)" name="pathLengthMm" error={e.pathLengthMm}>
          <TextInput name="pathLengthMm" inputMode="decimal" value={fields.pathLengthMm} onChange={set("pathLengthMm")} error={e.pathLengthMm} />
        </Field>
        <div className="sm:col-span-2 lg:col-span-3">
          <Field label="Instrument" name="instrument" hint="e.g. UV-Vis 2, 10 mm quartz cell" error={e.instrument}>
            <TextInput name="instrument" value={fields.instrument} onChange={set("instrument")} error={e.instrument} />
          </Field>
        </div>
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" name="mode" value="preview" variant="secondary" disabled={pending || !file}>
          Check and preview
        </Button>
        <Button type="submit" name="mode" value="save" disabled={pending || !preview}>
          Save the spectrum
        </Button>
      </div>
      {state?.message && checkedFor === fingerprint && (
        <p role={state.ok ? "status" : "alert"} className={`text-sm ${state.ok ? "text-ok" : "text-bad"}`} data-testid="spectrum-message">
          {file && !data?.saved ? `${file.name}: ` : ""}
          {state.message}
        </p>
      )}
      {!state?.ok && data?.problems && checkedFor === fingerprint && <ProblemTable problems={data.problems} />}
      {preview && (
        <section aria-label="Preview of the spectrum" className="space-y-2 border border-line p-3" data-testid="spectrum-preview">
          <p className="text-sm">
            {preview.report.points} samples, {preview.report.rangeNm[0].toFixed(1)}–{preview.report.rangeNm[1].toFixed(1)} nm, step {preview.report.stepNm.median.toFixed(2)} nm
            {preview.report.uniform ? " (uniform)" : ` (from ${preview.report.stepNm.min.toFixed(2)} to ${preview.report.stepNm.max.toFixed(2)} nm)`}
            {preview.report.unit !== "nm" ? `, sent in ${preview.report.unit}` : ""}
            {preview.report.descending ? ", long to short wavelengths in the file" : ""}. λmax:{" "}
            <strong>{preview.colour.lambdaMaxNm === null ? "no band in the visible" : `${preview.colour.lambdaMaxNm.toFixed(1)} nm`}</strong>. Colour as measured, D65: L*, a*, b* ={" "}
            {preview.colour.lab.map((v) => v.toFixed(1)).join(", ")}.
          </p>
          {preview.warnings.map((w) => (
            <Notice key={w} tone="caution">
              {w}
            </Notice>
          ))}
          <SpectraChart
            spectra={[{ id: "preview", label: file?.name ?? "preview", points: preview.points, concentrationUmolL: Number(fields.concentrationUmolL) || null, pathLengthMm: Number(fields.pathLengthMm) || null }]}
          />
        </section>
      )}
    </form>
  );
}
