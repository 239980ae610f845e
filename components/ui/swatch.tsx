import { labD65InSrgbGamut, labD65ToHex } from "@/lib/color/display";
import type { Lab } from "@/lib/color/types";

const SIZES = { sm: "h-6 w-6", md: "h-10 w-10", lg: "h-16 w-16" } as const;

/**
 * A screen patch for a CIELAB D65 value. It is an approximation (sRGB, clipped), and says so: the
 * accessible name carries the numbers, and a colour an sRGB screen cannot show gets a hatched corner —
 * a shape, not a tone — plus the words "outside sRGB" in its name.
 */
export function Swatch({ lab, size = "md", label }: { lab: Lab; size?: "sm" | "md" | "lg"; label?: string }) {
  const hex = labD65ToHex(lab);
  const inGamut = labD65InSrgbGamut(lab);
  const title = `${label ? label + ": " : ""}≈ L* ${lab[0].toFixed(1)}, a* ${lab[1].toFixed(1)}, b* ${lab[2].toFixed(1)}${inGamut ? "" : " (outside sRGB: the screen shows it less saturated)"}`;
  return (
    <span
      role="img"
      aria-label={title}
      title={title}
      className={`relative inline-block shrink-0 border border-black/25 outline outline-1 -outline-offset-2 outline-white/40 ${SIZES[size]}`}
      style={{ backgroundColor: hex }}
    >
      {!inGamut && <span aria-hidden className={`gamut-corner absolute right-0 top-0 ${size === "sm" ? "h-2.5 w-2.5" : "h-3.5 w-3.5"}`} />}
    </span>
  );
}

/** The legend every page with swatches can show: what a swatch is and what its marks mean. */
export function SwatchKey({ className = "" }: { className?: string }) {
  return (
    <p className={`flex flex-wrap items-center gap-x-3 gap-y-1 text-xs text-ink-soft ${className}`}>
      <span>
        <span aria-hidden className="mr-1 font-bold text-ink">
          ≈
        </span>
        Swatches are screen approximations of measured CIELAB (D65) colours; decisions rest on the numbers.
      </span>
      <span className="inline-flex items-center gap-1.5">
        <span aria-hidden className="relative inline-block h-4 w-4 border border-black/25 bg-[#8aa]">
          <span className="gamut-corner absolute right-0 top-0 h-2 w-2" />
        </span>
        Hatched corner: outside sRGB, shown less saturated than measured.
      </span>
    </p>
  );
}
