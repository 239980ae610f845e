import type { Role } from "@/db/schema";

export type NavItem = { href: string; label: string; roles: readonly Role[]; hint: string };
export type NavGroup = { label: string; items: NavItem[] };

const ALL: readonly Role[] = ["admin", "chemist", "formulator"];
const BENCH: readonly Role[] = ["admin", "chemist"];

/**
 * Every area of the product, with who may open it, grouped the way a lab day runs: measure colours,
 * look records up, choose dyes. Pages check the same roles themselves.
 */
export const NAV_GROUPS: NavGroup[] = [
  { label: "Start", items: [{ href: "/", label: "Overview", roles: ALL, hint: "What is new in the lab" }] },
  {
    label: "Measure",
    items: [
      { href: "/bench", label: "Bench", roles: BENCH, hint: "Rack photos and measurements" },
      { href: "/review", label: "Review", roles: BENCH, hint: "Measurements waiting for a second chemist" },
      { href: "/lighting", label: "Lighting", roles: ALL, hint: "Lighting profiles and calibration targets" },
    ],
  },
  {
    label: "Look up",
    items: [
      { href: "/catalogue", label: "Catalogue", roles: ALL, hint: "Dyes and their colour response" },
      { href: "/measurements", label: "Measurements", roles: ALL, hint: "Every measured colour: filter, sort, export" },
      { href: "/acid-base", label: "pH series", roles: ALL, hint: "pH series of indicator dyes and their pKa" },
      { href: "/solvents", label: "Solvents", roles: ALL, hint: "Solvent parameters with sources" },
    ],
  },
  {
    label: "Choose",
    items: [
      { href: "/search", label: "Search", roles: ALL, hint: "Find a dye by colour and condition" },
      { href: "/tune", label: "Tune", roles: ALL, hint: "Which solvent or blend gives a wanted colour" },
      { href: "/compare", label: "Compare", roles: ALL, hint: "Dyes side by side across conditions" },
      { href: "/shortlists", label: "Shortlists", roles: ALL, hint: "Candidate dyes with notes" },
    ],
  },
  { label: "Lab", items: [{ href: "/people", label: "People", roles: ["admin"], hint: "Accounts, invitations, mailbox, audit log" }] },
];

export const NAV_ITEMS: NavItem[] = NAV_GROUPS.flatMap((g) => g.items);

export function navGroupsFor(role: Role): NavGroup[] {
  return NAV_GROUPS.map((g) => ({ label: g.label, items: g.items.filter((item) => item.roles.includes(role)) })).filter((g) => g.items.length > 0);
}

export function navFor(role: Role): NavItem[] {
  return navGroupsFor(role).flatMap((g) => g.items);
}
