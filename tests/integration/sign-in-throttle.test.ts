/**
 * Sign-in throttling (issue 11, defect 1). The policy follows OWASP ASVS 4.0.3 §2.2.1 (anti-automation
 * without locking the rightful owner out); the delays themselves are common practice, no source.
 * The socket address is stamped by scripts/peer-address.cjs in the real server; here the test loads
 * that same preload and sets the stamped header the way it would.
 */
import { afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { signInAction } from "@/app/actions/auth";
import type { ActionState } from "@/lib/auth/guard";
import { requestContext } from "../support/request-context";
import { buildWorld, form, PASSWORD, PEOPLE } from "../support/world";

process.env.TRUSTED_PROXIES = "127.0.0.1, 10.20.0.0/16";

beforeAll(async () => {
  // @ts-expect-error plain CommonJS preload without types
  await import("../../scripts/peer-address.cjs");
  await buildWorld();
});

afterEach(() => {
  vi.useRealTimers();
  vi.restoreAllMocks();
});

/** One request's context: the socket peer the preload would stamp, plus whatever headers the client sent. */
function from(peer: string, headers: Record<string, string> = {}) {
  requestContext.reset({}, { host: "localhost:3000", origin: "http://localhost:3000", "x-solvatlas-peer": peer, ...headers });
}

async function attempt(email: string, password: string): Promise<ActionState> {
  try {
    return await signInAction(null, form({ email, password, next: "/" }));
  } catch (error) {
    // A successful sign-in redirects.
    if ((error as { digest?: string }).digest?.startsWith("NEXT_REDIRECT")) return { ok: true };
    throw error;
  }
}

describe("sign-in throttling", () => {
  it("30 failures from one client without forwarded headers do not keep the admin out from another address", async () => {
    for (let i = 0; i < 30; i++) {
      from("203.0.113.66");
      await attempt(`guess${i}@lab.test`, "wrong password");
    }
    from("192.0.2.10");
    expect(await attempt(PEOPLE.admin.email, PASSWORD)).toMatchObject({ ok: true });
  });

  it("rotating X-Forwarded-For from an untrusted peer does not escape the per-address slow-down", async () => {
    const warn = vi.spyOn(console, "warn").mockImplementation(() => undefined);
    for (let i = 0; i < 12; i++) {
      from("203.0.113.77", { "x-forwarded-for": `198.51.100.${i}` });
      const state = await attempt(`other${i}@lab.test`, "wrong password");
      if (state?.code === "rate_limited") break;
    }
    from("203.0.113.77", { "x-forwarded-for": "198.51.100.200" });
    const state = await attempt("someone-new@lab.test", "wrong password");
    expect(state).toMatchObject({ ok: false, code: "rate_limited" });
    expect(state?.message).toMatch(/Wait \d+ seconds? and try again/);
    // It is logged, with the address the socket came from, never the password.
    const logged = warn.mock.calls.map((c) => String(c[0])).find((line) => line.includes("sign-in.throttled"));
    expect(logged).toContain("203.0.113.77");
    expect(logged).not.toContain("wrong password");
  });

  it("a trusted proxy's X-Forwarded-For names the client; each client has its own allowance", async () => {
    for (let i = 0; i < 12; i++) {
      from("127.0.0.1", { "x-forwarded-for": `198.51.100.9, 10.20.3.4` });
      await attempt(`nobody${i}@lab.test`, "wrong password");
    }
    from("127.0.0.1", { "x-forwarded-for": "198.51.100.9, 10.20.3.4" });
    expect(await attempt("nobody-else@lab.test", "wrong password")).toMatchObject({ code: "rate_limited" });
    // Another client behind the same proxy is not slowed down by the first one.
    from("127.0.0.1", { "x-forwarded-for": "198.51.100.10" });
    expect(await attempt(PEOPLE.formulator.email, PASSWORD)).toMatchObject({ ok: true });
  });

  it("failures on one account slow it down; the right password works again after a short wait, not 15 minutes", async () => {
    const email = PEOPLE.chemist.email;
    for (let i = 0; i < 5; i++) {
      from(`192.0.2.${100 + i}`);
      expect(await attempt(email, "wrong password")).toMatchObject({ ok: false });
    }
    from("192.0.2.50");
    expect(await attempt(email, PASSWORD)).toMatchObject({ ok: false, code: "rate_limited" });
    vi.useFakeTimers({ now: Date.now() + 31_000, toFake: ["Date"] });
    from("192.0.2.50");
    expect(await attempt(email, PASSWORD)).toMatchObject({ ok: true });
    // A successful sign-in clears the account's count: the next typo is not slowed down.
    from("192.0.2.51");
    expect(await attempt(email, "wrong password")).toMatchObject({ ok: false, code: "unauthenticated" });
  });
});
