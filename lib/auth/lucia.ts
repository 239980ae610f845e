/**
 * The one place that knows Solvatlas uses lucia for sessions; everything else calls lib/auth.
 */
import { DrizzleSQLiteAdapter } from "@lucia-auth/adapter-drizzle";
import { Lucia, TimeSpan } from "lucia";
import type { Db } from "@/db/connection";
import { sessions, users, type Role } from "@/db/schema";

export const SESSION_COOKIE = "solvatlas_session";

function createLucia(db: Db) {
  const adapter = new DrizzleSQLiteAdapter(db, sessions, users);
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(14, "d"),
    sessionCookie: {
      name: SESSION_COOKIE,
      expires: true,
      // `secure` is decided per request in lib/auth/cookies.ts (plain http on a bench LAN is allowed).
      attributes: { sameSite: "lax", secure: false },
    },
    getUserAttributes: (a) => ({
      email: a.email,
      name: a.name,
      role: a.role,
      deactivatedAt: a.deactivatedAt,
    }),
  });
}

export type SolvatlasLucia = ReturnType<typeof createLucia>;

const instances = new WeakMap<Db, SolvatlasLucia>();

export function luciaFor(db: Db): SolvatlasLucia {
  let instance = instances.get(db);
  if (!instance) {
    instance = createLucia(db);
    instances.set(db, instance);
  }
  return instance;
}

declare module "lucia" {
  interface Register {
    Lucia: SolvatlasLucia;
    DatabaseUserAttributes: {
      email: string;
      name: string;
      role: Role;
      deactivatedAt: Date | number | null;
    };
  }
}
