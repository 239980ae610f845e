import type { Role } from "@/db/schema";

export type NavItem = { href: string; label: string; roles: readonly Role[]; hint: string };

const ALL: readonly Role[] = ["admin", "chemist", "formulator"];
const BENCH: readonly Role[] = ["admin", "chemist"];

/** Every area of the product, with who may open it. Pages check the same roles themselves. */
export const NAV_ITEMS: NavItem[] = [
  { href: "/", label: "Overview", roles: ALL, hint: "What is new in the lab" },
  { href: "/catalogue", label: "Catalogue", roles: ALL, hint: "Dyes and their colour response" },
  { href: "/bench", label: "Bench", roles: BENCH, hint: "Rack photos and measurements" },
  { href: "/measurements", label: "Measurements", roles: ALL, hint: "Every measured colour: filter, sort, export" },
  { href: "/search", label: "Search", roles: ALL, hint: "Find a dye by colour and condition" },
  { href: "/tune", label: "Tune", roles: ALL, hint: "Which solvent or blend gives a wanted colour" },
  { href: "/compare", label: "Compare", roles: ALL, hint: "Dyes side by side across conditions" },
  { href: "/solvents", label: "Solvents", roles: ALL, hint: "Solvent parameters with sources" },
  { href: "/lighting", label: "Lighting", roles: ALL, hint: "Lighting profiles and calibration targets" },
  { href: "/review", label: "Review", roles: BENCH, hint: "Measurements waiting for a second chemist" },
  { href: "/shortlists", label: "Shortlists", roles: ALL, hint: "Candidate dyes with notes" },
  { href: "/people", label: "People", roles: ["admin"], hint: "Accounts, invitations, mailbox, audit log" },
];

export function navFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => item.roles.includes(role));
}
