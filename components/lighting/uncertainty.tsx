/** A stored colour's combined standard uncertainty as "± x.x ΔE00" (JCGM 100 practice; see lib/color/uncertainty.ts). */
export function UncertaintyText({ value }: { value: number | null | undefined }) {
  if (value === null || value === undefined) return <span className="text-ink-soft" title="Measured before uncertainties were stored">not recorded</span>;
  return <span title="Combined standard uncertainty (pixel noise, reference, lighting profile)">± {value.toFixed(1)} ΔE00</span>;
}
