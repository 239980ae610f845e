"use client";

import { useActionState } from "react";
import { createCheckStandardAction, saveProfileAction, saveTargetAction, updateCheckStandardAction } from "@/app/actions/lighting";
import { Field, Select, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

export type ProfileDraftValues = {
  id?: string;
  name: string;
  illuminant: string;
  lightSource: string;
  colourTemperatureK: number | null;
  camera: string;
  cameraSettings: string;
  targetId: string | null;
  method: string;
  validFrom: string;
  validUntil: string;
  notes: string;
};

const day = (d: Date) => d.toISOString().slice(0, 10);

export function ProfileForm({ values, targets }: { values?: ProfileDraftValues; targets: { id: string; name: string }[] }) {
  const [state, action] = useActionState(saveProfileAction, null);
  // Ids unique per form: the lighting page shows several forms with the same field names.
  const idp = `profile-${values?.id ?? "new"}-`;
  const e = state?.fieldErrors ?? {};
  const v = values;
  return (
    <form action={action} className="grid gap-3 md:grid-cols-2" noValidate aria-label={v?.id ? "Edit draft profile" : "New draft profile"}>
      {v?.id && <input type="hidden" name="id" value={v.id} />}
      <Field label="Name" name={`${idp}name`} error={e.name}>
        <TextInput id={`${idp}name`} name="name" defaultValue={v?.name ?? ""} error={e.name} />
      </Field>
      <Field label="Light source" name={`${idp}lightSource`} error={e.lightSource} hint="e.g. daylight LED panel behind a diffuser">
        <TextInput id={`${idp}lightSource`} name="lightSource" defaultValue={v?.lightSource ?? ""} error={e.lightSource} />
      </Field>
      <Field label="CIE illuminant it stands for" name={`${idp}illuminant`} error={e.illuminant}>
        <Select id={`${idp}illuminant`} name="illuminant" defaultValue={v?.illuminant ?? "D65"}>
          <option value="D65">D65</option>
          <option value="D50">D50</option>
          <option value="A">A</option>
        </Select>
      </Field>
      <Field label="Colour temperature (K)" name={`${idp}colourTemperatureK`} error={e.colourTemperatureK}>
        <TextInput id={`${idp}colourTemperatureK`} name="colourTemperatureK" inputMode="decimal" defaultValue={v?.colourTemperatureK ?? ""} error={e.colourTemperatureK} />
      </Field>
      <Field label="Camera" name={`${idp}camera`} error={e.camera}>
        <TextInput id={`${idp}camera`} name="camera" defaultValue={v?.camera ?? ""} error={e.camera} />
      </Field>
      <Field label="Fixed camera settings" name={`${idp}cameraSettings`} error={e.cameraSettings} hint="exposure, ISO, white balance, HDR off">
        <TextInput id={`${idp}cameraSettings`} name="cameraSettings" defaultValue={v?.cameraSettings ?? ""} error={e.cameraSettings} />
      </Field>
      <Field label="Calibration target" name={`${idp}targetId`} error={e.targetId}>
        <Select id={`${idp}targetId`} name="targetId" defaultValue={v?.targetId ?? targets[0]?.id ?? ""}>
          <option value="">none yet</option>
          {targets.map((t) => (
            <option key={t.id} value={t.id}>
              {t.name}
            </option>
          ))}
        </Select>
      </Field>
      <Field label="Method" name={`${idp}method`} error={e.method} hint="Automatic picks the lowest leave-one-out ΔE00">
        <Select id={`${idp}method`} name="method" defaultValue={v?.method ?? "auto"}>
          <option value="auto">automatic (by leave-one-out)</option>
          <option value="matrix-3x3">3×3 matrix</option>
          <option value="root-polynomial-2">root-polynomial, degree 2 (18+ patches)</option>
          <option value="white">white scaling only</option>
        </Select>
      </Field>
      <Field label="Valid from" name={`${idp}validFrom`} error={e.validFrom}>
        <TextInput id={`${idp}validFrom`} name="validFrom" type="date" defaultValue={v?.validFrom ?? day(new Date())} error={e.validFrom} />
      </Field>
      <Field label="Valid until (empty: open)" name={`${idp}validUntil`} error={e.validUntil}>
        <TextInput id={`${idp}validUntil`} name="validUntil" type="date" defaultValue={v?.validUntil ?? ""} error={e.validUntil} />
      </Field>
      <div className="md:col-span-2">
        <Field label="Notes" name={`${idp}notes`} error={e.notes}>
          <TextArea id={`${idp}notes`} name="notes" defaultValue={v?.notes ?? ""} error={e.notes} />
        </Field>
      </div>
      <div className="space-y-2 md:col-span-2">
        <SubmitButton pendingText="Saving…">{v?.id ? "Save draft" : "Create draft profile"}</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}

export type TargetValues = { id?: string; name: string; description: string; source: string; whitePoint: string; gridRows: number | null; gridColumns: number | null; csv: string };

export function TargetForm({ values }: { values?: TargetValues }) {
  const [state, action] = useActionState(saveTargetAction, null);
  const idp = `target-${values?.id ?? "new"}-`;
  const e = state?.fieldErrors ?? {};
  const v = values;
  return (
    <form action={action} className="grid gap-3 md:grid-cols-2" noValidate aria-label={v?.id ? `Edit target ${v.name}` : "New calibration target"}>
      {v?.id && <input type="hidden" name="id" value={v.id} />}
      <Field label="Name" name={`${idp}name`} error={e.name}>
        <TextInput id={`${idp}name`} name="name" defaultValue={v?.name ?? ""} error={e.name} />
      </Field>
      <Field label="Values measured under" name={`${idp}whitePoint`} error={e.whitePoint}>
        <Select id={`${idp}whitePoint`} name="whitePoint" defaultValue={v?.whitePoint ?? "D50"}>
          <option value="D50">D50</option>
          <option value="D65">D65</option>
        </Select>
      </Field>
      <Field label="Rows" name={`${idp}gridRows`} error={e.gridRows}>
        <TextInput id={`${idp}gridRows`} name="gridRows" inputMode="numeric" defaultValue={v?.gridRows ?? ""} error={e.gridRows} />
      </Field>
      <Field label="Columns" name={`${idp}gridColumns`} error={e.gridColumns}>
        <TextInput id={`${idp}gridColumns`} name="gridColumns" inputMode="numeric" defaultValue={v?.gridColumns ?? ""} error={e.gridColumns} />
      </Field>
      <Field label="Source of the values" name={`${idp}source`} error={e.source} hint="instrument and date, or the maker's sheet">
        <TextInput id={`${idp}source`} name="source" defaultValue={v?.source ?? ""} error={e.source} />
      </Field>
      <Field label="Description" name={`${idp}description`} error={e.description}>
        <TextInput id={`${idp}description`} name="description" defaultValue={v?.description ?? ""} error={e.description} />
      </Field>
      <div className="md:col-span-2">
        <Field label="Patches (CSV: name, L*, a*, b*, white point; row by row from the top left)" name={`${idp}csv`} error={e.csv}>
          <TextArea id={`${idp}csv`} name="csv" defaultValue={v?.csv ?? "name,L*,a*,b*,white point\n"} error={e.csv} rows={8} />
        </Field>
      </div>
      <div className="space-y-2 md:col-span-2">
        <SubmitButton pendingText="Saving…">{v?.id ? "Save target" : "Create target"}</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}

export type CheckStandardValues = { id: string; name: string; kind: "vial" | "tile"; l: number; a: number; b: number; whitePoint: string; sourceInstrument: string; notes: string; readings: number };

/** Registers a check standard, or edits one (`values`); a standard with readings keeps its known value (the server refuses a change). */
export function CheckStandardForm({ values }: { values?: CheckStandardValues }) {
  const [state, action] = useActionState(values ? updateCheckStandardAction : createCheckStandardAction, null);
  const idp = `check-${values?.id ?? "new"}-`;
  const e = state?.fieldErrors ?? {};
  const v = values;
  // The known value is what earlier readings' ΔE00 were computed against: shown, not editable, once there are readings.
  const locked = (v?.readings ?? 0) > 0;
  const lockHint = locked ? `fixed: ${v!.readings} reading${v!.readings === 1 ? "" : "s"} were computed against it` : undefined;
  // Full precision, so an unchanged value is sent back exactly as stored.
  const num = (n: number | undefined) => (n === undefined ? "" : String(n));
  return (
    <form action={action} className="grid gap-3 md:grid-cols-3" noValidate aria-label={v ? `Edit check standard ${v.name}` : "New check standard"}>
      {v && <input type="hidden" name="id" value={v.id} />}
      <Field label="Name" name={`${idp}name`} error={e.name}>
        <TextInput id={`${idp}name`} name="name" defaultValue={v?.name ?? ""} error={e.name} />
      </Field>
      <Field label="Kind" name={`${idp}kind`} error={e.kind}>
        <Select id={`${idp}kind`} name="kind" defaultValue={v?.kind ?? "vial"}>
          <option value="vial">sealed vial</option>
          <option value="tile">tile</option>
        </Select>
      </Field>
      <Field label="White point" name={`${idp}whitePoint`} error={e.whitePoint} hint={lockHint}>
        {locked ? (
          <>
            <input type="hidden" name="whitePoint" value={v!.whitePoint} />
            <TextInput id={`${idp}whitePoint`} value={v!.whitePoint} readOnly aria-readonly="true" />
          </>
        ) : (
          <Select id={`${idp}whitePoint`} name="whitePoint" defaultValue={v?.whitePoint ?? "D50"}>
            <option value="D50">D50</option>
            <option value="D65">D65</option>
          </Select>
        )}
      </Field>
      {(["l", "a", "b"] as const).map((f) => (
        <Field key={f} label={{ l: "L*", a: "a*", b: "b*" }[f]} name={`${idp}${f}`} error={e[f]} hint={lockHint}>
          <TextInput id={`${idp}${f}`} name={f} inputMode="decimal" defaultValue={num(v?.[f])} readOnly={locked} aria-readonly={locked || undefined} error={e[f]} />
        </Field>
      ))}
      <Field label="Measured with (instrument, date)" name={`${idp}sourceInstrument`} error={e.sourceInstrument}>
        <TextInput id={`${idp}sourceInstrument`} name="sourceInstrument" defaultValue={v?.sourceInstrument ?? ""} error={e.sourceInstrument} />
      </Field>
      <div className="md:col-span-2">
        <Field label="Notes" name={`${idp}notes`} error={e.notes}>
          <TextInput id={`${idp}notes`} name="notes" defaultValue={v?.notes ?? ""} error={e.notes} />
        </Field>
      </div>
      <div className="space-y-2 md:col-span-3">
        {locked && <p className="text-xs text-ink-soft">For a new known value, register it as a new check standard and retire this one.</p>}
        <SubmitButton pendingText="Saving…">{v ? "Save check standard" : "Register check standard"}</SubmitButton>
        <FormMessage state={state} />
      </div>
    </form>
  );
}
