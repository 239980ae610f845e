import Link from "next/link";
import type { ComponentProps } from "react";

type Variant = "primary" | "secondary" | "danger" | "ghost";

// Achromatic controls, so the only chromatic things on a page are measured colours (see app/globals.css).
const VARIANTS: Record<Variant, string> = {
  primary: "bg-ink text-white border border-ink hover:bg-[#3a3a3a]",
  secondary: "bg-white text-ink border border-field hover:bg-paper",
  danger: "bg-white text-bad border border-bad hover:bg-red-50",
  ghost: "bg-transparent text-ink border border-transparent underline hover:bg-paper-deep",
};

// 44 px minimum height: large enough to hit with gloves on.
const BASE =
  "inline-flex min-h-11 items-center justify-center gap-2 rounded-md px-4 text-sm font-semibold no-underline transition-colors disabled:cursor-not-allowed disabled:opacity-50";

export function Button({ variant = "primary", className = "", ...props }: ComponentProps<"button"> & { variant?: Variant }) {
  return <button className={`${BASE} ${VARIANTS[variant]} ${className}`} {...props} />;
}

export function ButtonLink({ variant = "secondary", className = "", ...props }: ComponentProps<typeof Link> & { variant?: Variant }) {
  return <Link className={`${BASE} ${VARIANTS[variant]} ${className}`} {...props} />;
}
