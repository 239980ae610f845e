import { labD65ToHex } from "@/lib/color/display";
import type { Lab } from "@/lib/color/types";

/**
 * A predicted colour: the swatch is hatched with white diagonal lines and labelled "predicted ± u", so it
 * cannot be taken for a measurement with or without colour vision.
 */
export function PredictedSwatch({ lab, uncertaintyDeltaE00, label, size = "lg" }: { lab: Lab; uncertaintyDeltaE00: number; label?: string; size?: "md" | "lg" }) {
  const hex = labD65ToHex(lab);
  const sizes = { md: "h-10 w-10", lg: "h-16 w-16" } as const;
  const title = `${label ? label + ": " : ""}predicted L* ${lab[0].toFixed(1)}, a* ${lab[1].toFixed(1)}, b* ${lab[2].toFixed(1)} ± ${uncertaintyDeltaE00.toFixed(1)} ΔE00 (not measured)`;
  return (
    <span
      role="img"
      aria-label={title}
      title={title}
      data-predicted="true"
      className={`relative inline-block shrink-0 rounded-md border-2 border-dashed border-ink/60 ${sizes[size]}`}
      style={{
        backgroundColor: hex,
        backgroundImage: "repeating-linear-gradient(135deg, rgba(255,255,255,0.75) 0 2px, transparent 2px 8px)",
      }}
    />
  );
}
