/** A stand-in for the per-request cookie jar and headers of a Next server, driven by the test. */
type Jar = Map<string, string>;

let jar: Jar = new Map();
let extraHeaders: Record<string, string> = {};

export const requestContext = {
  reset(cookies: Record<string, string> = {}, headers: Record<string, string> = {}) {
    jar = new Map(Object.entries(cookies));
    extraHeaders = headers;
  },
  cookie(name: string): string | undefined {
    return jar.get(name);
  },
  cookieStore() {
    return {
      get: (name: string) => (jar.has(name) ? { name, value: jar.get(name)! } : undefined),
      set: (name: string, value: string) => void jar.set(name, value),
      delete: (name: string) => void jar.delete(name),
    };
  },
  headers() {
    const h = new Headers(extraHeaders);
    h.set("cookie", [...jar].map(([k, v]) => `${k}=${v}`).join("; "));
    return h;
  },
};
