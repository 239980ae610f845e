"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useActionState, useEffect, useState } from "react";
import { deletePhSeriesAction, savePhSeriesAction } from "@/app/actions/ph-series";
import { Badge } from "@/components/ui/card";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";
import { Swatch } from "@/components/ui/swatch";
import type { Lab } from "@/lib/color/types";

export type EditorVial = { measurementId: string; lab: Lab; reviewState: string; conditionPh: number | null; acidBase: string; additive: string; source: string; createdAt: string };
export type EditorHead = { dyeId: string; name: string; solventId: string; secondSolventId: string | null; secondSolventMoleFraction: number | null; ionicStrengthMolL: number | null; notes: string };

/**
 * Select the vials of one dye in one medium that make a pH series, give each its pH (the condition's
 * pH is offered), name the series and save. The medium is fixed here; it was chosen on the way in.
 */
export function SeriesEditor({ seriesId, head, mediumLabel, candidates, selected }: { seriesId?: string; head: EditorHead; mediumLabel: string; candidates: EditorVial[]; selected: Record<string, number> }) {
  const [state, action] = useActionState(savePhSeriesAction, null);
  const [removeState, removeAction] = useActionState(deletePhSeriesAction, null);
  const [rows, setRows] = useState(() =>
    Object.fromEntries(candidates.map((c) => [c.measurementId, { on: c.measurementId in selected, pH: String(selected[c.measurementId] ?? c.conditionPh ?? "") }])),
  );
  const [name, setName] = useState(head.name);
  const [ionic, setIonic] = useState(head.ionicStrengthMolL === null ? "" : String(head.ionicStrengthMolL));
  const [notes, setNotes] = useState(head.notes);
  const chosen = candidates.filter((c) => rows[c.measurementId]?.on);
  const payload = JSON.stringify({
    id: seriesId,
    head: { ...head, name, notes, ionicStrengthMolL: ionic.trim() === "" ? null : Number(ionic.replace(",", ".")) },
    vials: chosen.map((c) => ({ measurementId: c.measurementId, pH: rows[c.measurementId].pH.trim() === "" ? null : Number(rows[c.measurementId].pH.replace(",", ".")) })),
  });
  const savedId = (state?.data?.id as string | undefined) ?? seriesId;
  const router = useRouter();
  // A new series, once saved, is edited on its own page (saving again here would make a second one).
  useEffect(() => {
    if (state?.ok && !seriesId && savedId) router.push(`/acid-base/${encodeURIComponent(savedId)}`);
  }, [state, seriesId, savedId, router]);
  if (removeState?.ok) {
    return (
      <p role="status" className="text-sm text-ok">
        {removeState.message} <Link href="/acid-base">Back to the pH series</Link>
      </p>
    );
  }
  return (
    <div className="space-y-4">
      <form action={action} className="space-y-4" aria-label="pH series">
        <input type="hidden" name="payload" value={payload} />
        <div className="grid gap-4 sm:grid-cols-3">
          <Field label="Series name" name="name" error={state?.fieldErrors?.["head.name"]}>
            <TextInput name="name" value={name} onChange={(e) => setName(e.target.value)} placeholder="Water, universal buffer, 23 °C" />
          </Field>
          <Field label="Medium" name="medium-label" hint="Chosen on the way in; start a new series for another medium.">
            <TextInput name="medium-label" value={mediumLabel} readOnly />
          </Field>
          <Field label="Ionic strength (mol/L)" name="ionic" hint="Leave empty when not recorded." error={state?.fieldErrors?.["head.ionicStrengthMolL"]}>
            <TextInput name="ionic" inputMode="decimal" value={ionic} onChange={(e) => setIonic(e.target.value)} />
          </Field>
        </div>
        <Field label="Notes (buffer, temperature, how the pH was measured)" name="notes">
          <TextArea name="notes" value={notes} onChange={(e) => setNotes(e.target.value)} />
        </Field>
        <fieldset className="min-w-0">
          <legend className="mb-2 text-sm font-semibold">
            Vials of this dye in {mediumLabel} ({chosen.length} of {candidates.length} selected)
          </legend>
          {candidates.length === 0 ? (
            <p className="text-sm text-ink-soft">No accepted or pending measurement of this dye in this medium yet. Measure the vials on the bench, or import the series from CSV.</p>
          ) : (
            <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="series-candidates">
              <thead className="text-xs text-ink-soft">
                <tr>
                  <th className="py-1 pr-2">In series</th>
                  <th className="py-1 pr-2">Colour (CIELAB D65)</th>
                  <th className="py-1 pr-2">pH of the vial</th>
                  <th className="py-1 pr-2">Condition</th>
                  <th className="py-1 pr-2">Source</th>
                  <th className="py-1">Review</th>
                </tr>
              </thead>
              <tbody>
                {candidates.map((c) => {
                  const row = rows[c.measurementId];
                  return (
                    <tr key={c.measurementId} className="border-t border-line align-middle" data-testid="series-candidate">
                      <td className="py-1 pr-2">
                        <input
                          type="checkbox"
                          className="h-5 w-5"
                          aria-label={`Include vial ${c.measurementId}`}
                          checked={row.on}
                          onChange={(e) => setRows((r) => ({ ...r, [c.measurementId]: { ...r[c.measurementId], on: e.target.checked } }))}
                        />
                      </td>
                      <td className="py-1 pr-2">
                        <span className="flex items-center gap-2 tabular-nums">
                          <Swatch lab={c.lab} size="sm" />
                          {c.lab.map((v) => v.toFixed(1)).join(", ")}
                        </span>
                      </td>
                      <td className="py-1 pr-2">
                        <input
                          aria-label={`pH of vial ${c.measurementId}`}
                          inputMode="decimal"
                          value={row.pH}
                          onChange={(e) => setRows((r) => ({ ...r, [c.measurementId]: { ...r[c.measurementId], pH: e.target.value } }))}
                          className="min-h-11 w-24 rounded-md border border-field px-2"
                        />
                      </td>
                      <td className="py-1 pr-2 text-ink-soft">
                        {c.acidBase}
                        {c.additive ? `, ${c.additive}` : ""}
                        {c.conditionPh !== null ? `, recorded pH ${c.conditionPh}` : ", no pH recorded"}
                      </td>
                      <td className="py-1 pr-2 text-ink-soft">{c.source}</td>
                      <td className="py-1">
                        <Badge tone={c.reviewState === "accepted" ? "ok" : "warn"}>{c.reviewState}</Badge>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            </div>
          )}
          <p className="mt-2 text-xs text-ink-soft">Only accepted vials are fitted; pending ones join the fit once another chemist accepts them. A pKa needs five accepted vials at four or more pH values.</p>
        </fieldset>
        <FormMessage state={state} />
        <div className="flex flex-wrap items-center gap-3">
          <SubmitButton pendingText="Saving and fitting…">{seriesId ? "Save the series" : "Create the series"}</SubmitButton>
          {state?.ok && savedId && (
            <Link href={`/acid-base/${encodeURIComponent(savedId)}`} className="text-sm underline">
              Open the saved series
            </Link>
          )}
        </div>
      </form>
      {seriesId && (
        <form action={removeAction} className="border-t border-line pt-4">
          <input type="hidden" name="id" value={seriesId} />
          <FormMessage state={removeState} />
          <SubmitButton variant="danger" pendingText="Deleting…">
            Delete this series (the measurements stay)
          </SubmitButton>
        </form>
      )}
    </div>
  );
}
