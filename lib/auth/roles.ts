import type { Role } from "@/db/schema";

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Admin",
  chemist: "Chemist",
  formulator: "Formulator",
};

export const ANY_ROLE: readonly Role[] = ["admin", "chemist", "formulator"];
export const BENCH_ROLES: readonly Role[] = ["admin", "chemist"];
export const ADMIN_ONLY: readonly Role[] = ["admin"];

export function hasRole(role: Role, allowed: readonly Role[]): boolean {
  return allowed.includes(role);
}

export function describeAllowed(allowed: readonly Role[]): string {
  const names = allowed.map((r) => ROLE_LABELS[r].toLowerCase() + "s");
  return names.length === 1 ? names[0] : `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`;
}
