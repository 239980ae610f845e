/**
 * Which forwarded headers are believed (issue 11, defects 1 and 8). The rule: X-Forwarded-For/-Host/-Proto
 * only from a socket peer in TRUSTED_PROXIES, walking X-Forwarded-For from the right past trusted hops
 * (MDN "X-Forwarded-For", section "Selecting an IP address"). Addresses are from the documentation
 * ranges of RFC 5737 (IPv4) and RFC 3849 (IPv6).
 */
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { forwardedView, parseTrustedProxies, PEER_HEADER } from "@/lib/net/client-address";
import { checkSameOrigin } from "@/lib/net/same-origin";

const STAMPED = Symbol.for("solvatlas.peer-stamped");
const g = globalThis as Record<symbol, unknown>;

function trusted(text: string) {
  const parsed = parseTrustedProxies(text);
  if ("error" in parsed) throw new Error(parsed.error);
  return parsed.list;
}

beforeEach(() => {
  g[STAMPED] = true;
});
afterEach(() => {
  delete g[STAMPED];
});

describe("forwardedView", () => {
  it("believes nothing forwarded from an untrusted peer", () => {
    const h = new Headers({ [PEER_HEADER]: "203.0.113.7", "x-forwarded-for": "198.51.100.1", "x-forwarded-host": "evil.example", "x-forwarded-proto": "https", host: "lab.example" });
    expect(forwardedView(h, trusted("127.0.0.1"))).toEqual({ address: "203.0.113.7", host: "lab.example", proto: null });
  });

  it("walks X-Forwarded-For from the right past trusted proxies (CIDR and IPv4-mapped IPv6 peers)", () => {
    const h = new Headers({ [PEER_HEADER]: "::ffff:10.0.0.5", "x-forwarded-for": "192.0.2.200, 198.51.100.9, 10.0.3.4", "x-forwarded-host": "lab.example", "x-forwarded-proto": "https", host: "10.0.0.5:3000" });
    expect(forwardedView(h, trusted("10.0.0.0/8"))).toEqual({ address: "198.51.100.9", host: "lab.example", proto: "https" });
  });

  it("handles IPv6 proxies", () => {
    const h = new Headers({ [PEER_HEADER]: "2001:db8::1", "x-forwarded-for": "2001:db8:ffff::42" });
    expect(forwardedView(h, trusted("2001:db8::/64")).address).toBe("2001:db8:ffff::42");
  });

  it("without the stamped socket address (next dev, tests) believes no forwarded header even from a 'trusted' address", () => {
    delete g[STAMPED];
    const h = new Headers({ [PEER_HEADER]: "127.0.0.1", "x-forwarded-for": "127.0.0.1", "x-forwarded-host": "evil.example", host: "lab.example" });
    expect(forwardedView(h, trusted("127.0.0.1"))).toMatchObject({ host: "lab.example", proto: null });
  });

  it("refuses malformed TRUSTED_PROXIES entries with a reason", () => {
    expect(parseTrustedProxies("10.0.0.0/33")).toHaveProperty("error");
    expect(parseTrustedProxies("proxy.example")).toHaveProperty("error");
    expect(parseTrustedProxies("")).toHaveProperty("list");
  });
});

describe("checkSameOrigin", () => {
  const list = trusted("127.0.0.1");
  it("accepts our own Origin, falls back to Referer, refuses a missing or foreign one", () => {
    const base = { [PEER_HEADER]: "203.0.113.7", host: "lab.example" };
    expect(checkSameOrigin(new Headers({ ...base, origin: "https://lab.example" }), list)).toEqual({ ok: true });
    expect(checkSameOrigin(new Headers({ ...base, referer: "https://lab.example/bench" }), list)).toEqual({ ok: true });
    expect(checkSameOrigin(new Headers(base), list)).toEqual({ ok: false, reason: "missing" });
    expect(checkSameOrigin(new Headers({ ...base, origin: "null" }), list)).toEqual({ ok: false, reason: "missing" });
    expect(checkSameOrigin(new Headers({ ...base, origin: "https://evil.example" }), list)).toEqual({ ok: false, reason: "foreign" });
  });

  it("a forged X-Forwarded-Host from an untrusted peer does not make a foreign Origin ours", () => {
    const h = new Headers({ [PEER_HEADER]: "203.0.113.7", host: "lab.example", origin: "https://evil.example", "x-forwarded-host": "evil.example" });
    expect(checkSameOrigin(h, list).ok).toBe(false);
    const viaProxy = new Headers({ [PEER_HEADER]: "127.0.0.1", host: "127.0.0.1:3000", origin: "https://lab.example", "x-forwarded-host": "lab.example" });
    expect(checkSameOrigin(viaProxy, list).ok).toBe(true);
  });
});
