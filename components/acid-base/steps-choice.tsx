"use client";

import { useActionState } from "react";
import { setPhFitStepsAction } from "@/app/actions/ph-series";
import { FormMessage, SubmitButton } from "@/components/ui/form-status";

/** The chemist's choice for a series: fit one colour change (one pKa) or two (two pKa's). */
export function StepsChoice({ seriesId, steps }: { seriesId: string; steps: 1 | 2 }) {
  const [state, action] = useActionState(setPhFitStepsAction, null);
  return (
    <form action={action} className="space-y-2 text-sm" aria-label="Steps of the fit">
      <input type="hidden" name="id" value={seriesId} />
      <fieldset className="flex flex-wrap items-center gap-4">
        <legend className="mb-1 font-semibold">Colour changes to fit</legend>
        <label className="flex items-center gap-1">
          <input type="radio" name="steps" value="1" defaultChecked={steps === 1} /> one step (one pKa)
        </label>
        <label className="flex items-center gap-1">
          <input type="radio" name="steps" value="2" defaultChecked={steps === 2} /> two steps (H2In ⇌ HIn⁻ ⇌ In²⁻, two pKa&apos;s)
        </label>
        <SubmitButton variant="secondary" pendingText="Fitting…">
          Fit again
        </SubmitButton>
      </fieldset>
      <p className="text-xs text-ink-soft">
        Two steps needs three plateaus (a vial with at least 80 % of each form) and pKa&apos;s at least 1 unit apart; otherwise the fit says why and gives no pKa.
      </p>
      <FormMessage state={state} />
    </form>
  );
}
