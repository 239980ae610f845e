/**
 * Solvatlas's mark: the neutral step wedge of a calibration target (white to black), with one patch
 * lifted out as the sample being read against it. Drawn in ink only, so it never competes with a
 * measured colour on the page.
 */
export function Mark({ className = "" }: { className?: string }) {
  return (
    <svg viewBox="0 0 36 24" className={className} aria-hidden focusable="false">
      <rect x="0.5" y="8.5" width="35" height="15" fill="#fff" stroke="#161616" />
      <rect x="1" y="9" width="7" height="14" fill="#f3f3f3" />
      <rect x="8" y="9" width="7" height="14" fill="#b9b9b9" />
      <rect x="15" y="9" width="7" height="14" fill="#7a7a7a" />
      <rect x="22" y="9" width="7" height="14" fill="#454545" />
      <rect x="29" y="9" width="6.5" height="14" fill="#161616" />
      <rect x="15.5" y="0.5" width="6" height="6" fill="#fff" stroke="#161616" />
    </svg>
  );
}
