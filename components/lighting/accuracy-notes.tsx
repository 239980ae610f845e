/** What accuracy to expect and how to photograph for it; shown on the lighting and bench pages. */
export function AccuracyNotes() {
  return (
    <aside aria-label="Accuracy and capture protocol" className="rounded-lg border border-line bg-white px-4 py-3 text-sm text-ink">
      <p className="font-semibold">What accuracy to expect</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        <li>Phone JPEG with the calibration card in view: a few ΔE00.</li>
        <li>Fixed exposure and white balance (or RAW), diffuse backlight, a blank-solvent vial as the white: about 1–2 ΔE00.</li>
      </ul>
      <p className="mt-1 text-xs text-ink-soft">These are practitioner estimates, not published figures. Your lab&apos;s real accuracy is what its check standards show on the Lighting page.</p>
      <p className="mt-2 font-semibold">Capture protocol</p>
      <ol className="mt-1 list-decimal space-y-0.5 pl-5">
        <li>Fix exposure, white balance and ISO; turn HDR and beauty filters off.</li>
        <li>Light diffusely from behind or above the rack; keep a black surround.</li>
        <li>Put the calibration card and a blank-solvent vial in every photo.</li>
      </ol>
      <p className="mt-2 text-xs text-ink-soft">
        Never look into UV or bright LED sources; handle solvents in a fume hood with suitable gloves and eye protection. Local regulations and your lab&apos;s safety
        officer take precedence.
      </p>
    </aside>
  );
}
