import { labD65InSrgbGamut, labD65ToHex } from "@/lib/color/display";
import type { Lab } from "@/lib/color/types";

/** A colour swatch for a CIELAB D65 value; marks colours an sRGB screen cannot show exactly. */
export function Swatch({ lab, size = "md", label }: { lab: Lab; size?: "sm" | "md" | "lg"; label?: string }) {
  const hex = labD65ToHex(lab);
  const inGamut = labD65InSrgbGamut(lab);
  const sizes = { sm: "h-6 w-6", md: "h-10 w-10", lg: "h-16 w-16" } as const;
  const title = `${label ? label + ": " : ""}L* ${lab[0].toFixed(1)}, a* ${lab[1].toFixed(1)}, b* ${lab[2].toFixed(1)}${inGamut ? "" : " (outside sRGB: screen colour approximate)"}`;
  return (
    <span
      role="img"
      aria-label={title}
      title={title}
      className={`relative inline-block shrink-0 rounded-md border border-black/10 ${sizes[size]}`}
      style={{ backgroundColor: hex }}
    >
      {!inGamut && <span className="absolute right-0 top-0 h-0 w-0 border-l-[8px] border-t-[8px] border-l-transparent border-t-white/90" />}
    </span>
  );
}
