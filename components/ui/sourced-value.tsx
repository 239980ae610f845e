/**
 * A number with its published source behind a disclosure: press (mouse, touch, Enter or Space) to
 * read the source, press again to close. A tooltip alone is out of reach on a phone or keyboard. The
 * note opens in place, not floating: a floating note inside a scrolling table would widen the page.
 */
export function SourcedValue({ value, source, unit, label }: { value: string; source: string | null; unit?: string; label?: string }) {
  if (!source) {
    return (
      <span className="tabular-nums">
        {value}
        {unit ? ` ${unit}` : ""}
      </span>
    );
  }
  return (
    <details className="group inline-block text-left">
      <summary
        className="inline-flex min-h-8 cursor-pointer list-none items-center gap-1 tabular-nums underline decoration-dotted underline-offset-4 [&::-webkit-details-marker]:hidden"
        aria-label={`${label ? label + " " : ""}${value}${unit ? " " + unit : ""}: show source`}
      >
        {value}
        {unit ? ` ${unit}` : ""}
        <span aria-hidden className="font-mono text-[10px] text-ink-soft group-open:text-ink">
          src
        </span>
      </summary>
      <span role="note" className="mt-1 block w-56 max-w-[70vw] whitespace-normal border border-ink bg-white p-2 text-xs font-normal text-ink">
        <span className="font-semibold">Source: </span>
        {source}
      </span>
    </details>
  );
}
