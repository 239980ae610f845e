/**
 * The one wrapper every route handler and server action goes through: parse the input with zod,
 * identify the caller, check the role, then run the handler. Failures become typed errors.
 */
import "server-only";
import { unstable_rethrow } from "next/navigation";
import { z } from "zod";
import { db } from "@/db/client";
import type { Role } from "@/db/schema";
import { bodyLimitBytes, trustedProxies } from "@/lib/config/env";
import { AppError, isAppError } from "@/lib/errors";
import { checkDeclaredLength, readLimited } from "@/lib/net/limited-body";
import { checkSameOrigin, CSRF_MESSAGE } from "@/lib/net/same-origin";
import { identifyCaller } from "./request";
import { describeAllowed, hasRole } from "./roles";
import type { AuthUser } from "./service";
import { currentUser } from "./session";

export type Access = readonly Role[] | "public";

// zod's own wording ("Invalid input: expected string…") is for programmers; a form shows this instead.
const GENERIC_ZOD_MESSAGE = /^(Invalid|Too (small|big)|Expected|Unrecognized)/;

/**
 * API callers get the field's name in front of the message ("lab: …"): they wrote the JSON. A person
 * filling in a form gets only the sentence, shown beside the field they typed into.
 */
function flattenIssues(error: z.ZodError, audience: "api" | "form"): { message: string; fieldErrors: Record<string, string[]> } {
  const fieldErrors: Record<string, string[]> = {};
  const say = (message: string) => (audience === "form" && GENERIC_ZOD_MESSAGE.test(message) ? "Check this value and try again." : message);
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "_";
    (fieldErrors[key] ??= []).push(say(issue.message));
  }
  const first = error.issues[0];
  const field = first.path.join(".");
  if (audience === "form") {
    const more = error.issues.length > 1 ? ` (${error.issues.length} fields need a change; each is marked.)` : "";
    return { message: `${say(first.message)}${more}`, fieldErrors };
  }
  // Name the field unless the message already starts with it ("lab must be …").
  const where = field && !first.message.startsWith(field) ? `${field}: ` : "";
  return { message: `${where}${first.message}`, fieldErrors };
}

export function parseInput<S extends z.ZodType>(schema: S, input: unknown, audience: "api" | "form" = "api"): z.infer<S> {
  const result = schema.safeParse(input);
  if (!result.success) {
    const { message, fieldErrors } = flattenIssues(result.error, audience);
    throw new AppError("invalid_input", message, fieldErrors);
  }
  return result.data;
}

function authorize(user: AuthUser | null, access: Access): asserts user is AuthUser {
  if (access === "public") return;
  if (!user) throw new AppError("unauthenticated", "Sign in first, or send an API token as 'Authorization: Bearer <token>'.");
  if (!hasRole(user.role, access)) {
    throw new AppError("forbidden", `Only ${describeAllowed(access)} may do this; you are signed in as a ${user.role}.`);
  }
}

export function errorResponse(error: unknown): Response {
  if (isAppError(error)) {
    return Response.json(
      { error: { code: error.code, message: error.message, ...(error.fieldErrors ? { fields: error.fieldErrors } : {}) } },
      { status: error.status },
    );
  }
  console.error("Unhandled error in route handler:", error);
  return Response.json(
    { error: { code: "internal", message: "Something went wrong on the server. Try again; if it keeps happening, tell your admin." } },
    { status: 500 },
  );
}

type RouteContext<P> = { params: Promise<P> };

/** Route handler wrapper. `query` is parsed from the URL's search params; `body` from JSON. */
export function apiRoute<Q extends z.ZodType = z.ZodType<Record<string, never>>, B extends z.ZodType = z.ZodType<undefined>, P = unknown>(
  spec: { access: Access; query?: Q; body?: B },
  handler: (ctx: { req: Request; user: AuthUser; query: z.infer<Q>; body: z.infer<B>; params: P }) => Promise<Response | unknown>,
) {
  return async (req: Request, context?: RouteContext<P>): Promise<Response> => {
    try {
      const caller = await identifyCaller(db(), req.headers);
      if (caller.kind === "invalid") throw new AppError("unauthenticated", caller.reason);
      const user = caller.kind === "user" ? caller.user : null;
      authorize(user, spec.access);
      const mutating = !["GET", "HEAD", "OPTIONS"].includes(req.method);
      // Cookies ride along on cross-site requests; tokens do not. X-Forwarded-Host counts only from TRUSTED_PROXIES.
      if (mutating && caller.kind === "user" && caller.via === "session" && !checkSameOrigin(req.headers, trustedProxies()).ok) {
        throw new AppError("forbidden", CSRF_MESSAGE);
      }
      const query = spec.query ? parseInput(spec.query, Object.fromEntries(new URL(req.url).searchParams)) : {};
      let body: unknown = undefined;
      if (spec.body) {
        const limit = bodyLimitBytes();
        checkDeclaredLength(req.headers, limit);
        const bytes = await readLimited(req.body, limit);
        let raw: unknown;
        try {
          raw = JSON.parse(new TextDecoder().decode(bytes));
        } catch {
          throw new AppError("invalid_input", "The request body must be valid JSON.");
        }
        body = parseInput(spec.body, raw);
      }
      const params = (context ? await context.params : {}) as P;
      const result = await handler({ req, user: user as AuthUser, query: query as z.infer<Q>, body: body as z.infer<B>, params });
      return result instanceof Response ? result : Response.json(result);
    } catch (error) {
      return errorResponse(error);
    }
  };
}

/** What a server action returns to its form. */
export type ActionState = {
  ok: boolean;
  /** Error code when ok is false (see lib/errors). */
  code?: string;
  message?: string;
  fieldErrors?: Record<string, string[]>;
  data?: Record<string, unknown>;
  /** On failure, what was typed (text fields only, never passwords or tokens), so the form can show it again. */
  values?: Record<string, string>;
} | null;

const NEVER_ECHOED = /password|confirm|token|secret/i;

/** The text a person typed, to put back into the form after a refusal. */
export function typedValues(formData: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of formData.entries()) {
    if (key.startsWith("$ACTION") || NEVER_ECHOED.test(key) || typeof value !== "string") continue;
    out[key] = key in out ? `${out[key]}\n${value}` : value;
  }
  return out;
}

export function formDataToObject(formData: FormData): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of formData.entries()) {
    if (key.startsWith("$ACTION")) continue;
    if (key in out) {
      const prev = out[key];
      out[key] = Array.isArray(prev) ? [...prev, value] : [prev, value];
    } else out[key] = value;
  }
  return out;
}

/**
 * Server action wrapper, usable with useActionState: `(prevState, formData) => ActionState`.
 * Actions are public endpoints; this checks the caller's session and role on every call.
 */
export function formAction<S extends z.ZodType>(
  spec: { access: Access; schema: S },
  handler: (input: z.infer<S>, ctx: { user: AuthUser }) => Promise<ActionState | void>,
) {
  return async (_prev: ActionState, formData: FormData): Promise<ActionState> => {
    try {
      const user = await currentUser();
      authorize(user, spec.access);
      const input = parseInput(spec.schema, formDataToObject(formData), "form");
      return (await handler(input, { user })) ?? { ok: true };
    } catch (error) {
      unstable_rethrow(error);
      const values = typedValues(formData);
      if (isAppError(error)) return { ok: false, code: error.code, message: error.message, fieldErrors: error.fieldErrors, values };
      console.error("Unhandled error in server action:", error);
      return { ok: false, code: "internal", message: "Something went wrong on the server. Nothing was saved; try again.", values };
    }
  };
}
