/**
 * Who is on the other end of a request, and which forwarded headers may be believed.
 * X-Forwarded-For / -Host / -Proto are written by whoever sends the request; they are only believed
 * when the socket peer is one of TRUSTED_PROXIES (OWASP ASVS 4.0.3 §2.2.1 anti-automation needs a
 * client address the client cannot choose). Pure: no Next, no database.
 */
import { BlockList, isIP } from "node:net";

/** Set by scripts/peer-address.cjs on each request, from the socket; the client's own copy is dropped. */
export const PEER_HEADER = "x-solvatlas-peer";
const STAMPED = Symbol.for("solvatlas.peer-stamped");

/** True when the preload that stamps the socket address runs in this process (npm start / the demo). */
export function peerStamped(): boolean {
  return (globalThis as Record<symbol, unknown>)[STAMPED] === true;
}

function plainAddress(address: string): string {
  const a = address.trim().replace(/^\[|\]$/g, "");
  return a.toLowerCase().startsWith("::ffff:") && isIP(a.slice(7)) === 4 ? a.slice(7) : a;
}

/** TRUSTED_PROXIES: comma-separated addresses or CIDR ranges, IPv4 or IPv6 (e.g. "127.0.0.1, 10.0.0.0/8"). */
export function parseTrustedProxies(text: string): { list: BlockList; entries: string[] } | { error: string } {
  const list = new BlockList();
  const entries = text.split(",").map((s) => s.trim()).filter(Boolean);
  for (const entry of entries) {
    const [addr, bits, extra] = entry.split("/");
    const family = isIP(plainAddress(addr));
    if (!family || extra !== undefined) return { error: `"${entry}" is not an IP address or CIDR range` };
    const type = family === 4 ? "ipv4" : "ipv6";
    if (bits === undefined) list.addAddress(plainAddress(addr), type);
    else {
      const prefix = Number(bits);
      if (!Number.isInteger(prefix) || prefix < 0 || prefix > (family === 4 ? 32 : 128)) return { error: `"${entry}" has an impossible prefix length` };
      list.addSubnet(plainAddress(addr), prefix, type);
    }
  }
  return { list, entries };
}

function isTrusted(list: BlockList, address: string): boolean {
  const a = plainAddress(address);
  const family = isIP(a);
  return family !== 0 && list.check(a, family === 4 ? "ipv4" : "ipv6");
}

export type ForwardedView = {
  /** The client's address: the socket peer, or the nearest untrusted hop of X-Forwarded-For behind trusted proxies. */
  address: string;
  /** Host the client asked for (X-Forwarded-Host only from a trusted proxy). */
  host: string | null;
  /** "https" when the client's connection was TLS as far as we can tell. */
  proto: string | null;
};

/**
 * Reads a request's headers. The peer is the socket address stamped by the preload; without the
 * preload (`next dev`, tests) it is the right-most X-Forwarded-For entry, which Next fills from the
 * socket only when the client sent none, and no forwarded header is believed at all.
 */
export function forwardedView(headers: Headers, trusted: BlockList): ForwardedView {
  const xff = (headers.get("x-forwarded-for") ?? "").split(",").map((s) => s.trim()).filter(Boolean);
  const stamped = peerStamped() ? headers.get(PEER_HEADER) : null;
  const peer = plainAddress(stamped ?? xff[xff.length - 1] ?? "unknown");
  const host = headers.get("host");
  // Without the stamped socket address nothing forwarded is believed, whatever TRUSTED_PROXIES says.
  if (!stamped || !isTrusted(trusted, peer)) return { address: peer, host, proto: null };
  // Walk the chain from the right: every trusted hop vouches for the one before it.
  let address = peer;
  for (let i = xff.length - 1; i >= 0; i--) {
    address = plainAddress(xff[i]);
    if (!isTrusted(trusted, address)) break;
  }
  const first = (name: string) => (headers.get(name) ?? "").split(",")[0].trim() || null;
  return { address, host: first("x-forwarded-host") ?? host, proto: first("x-forwarded-proto") };
}
