import "server-only";
import { redirect } from "next/navigation";
import type { Role } from "@/db/schema";
import { hasRole } from "./roles";
import type { AuthUser } from "./service";
import { currentUser } from "./session";

/** For pages: the signed-in user (or a redirect to sign-in) and whether their role may see the page. */
export async function pageAccess(allowed: readonly Role[]): Promise<{ user: AuthUser; allowed: boolean }> {
  const user = await currentUser();
  if (!user) redirect("/sign-in");
  return { user, allowed: hasRole(user.role, allowed) };
}
