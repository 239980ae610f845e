/**
 * Cross-site request forgery on the API (issue 11, defect 8): a cookie-authenticated change needs an
 * Origin (or Referer) naming our host; X-Forwarded-Host is believed only from TRUSTED_PROXIES (none
 * here). Rule: OWASP CSRF Prevention Cheat Sheet, "Verifying Origin with standard headers".
 */
import { beforeAll, describe, expect, it } from "vitest";
import { POST as measurePhoto } from "@/app/api/photos/[id]/measure/route";
import { buildWorld, sessionCookieFor, tokenFor } from "../support/world";

let cookie = "";

beforeAll(async () => {
  await buildWorld();
  cookie = await sessionCookieFor("chemist");
}, 60_000);

function measure(headers: Record<string, string>) {
  return measurePhoto(
    new Request("http://localhost:3000/api/photos/ph_none/measure", {
      method: "POST",
      headers: { host: "localhost:3000", "content-type": "application/json", ...headers },
      body: JSON.stringify({ vials: [] }),
    }),
    { params: Promise.resolve({ id: "ph_none" }) },
  );
}

describe("cookie-authenticated API changes", () => {
  it("a forged X-Forwarded-Host does not make a foreign Origin look like ours (403)", async () => {
    const res = await measure({ cookie, origin: "http://evil.example", "x-forwarded-host": "evil.example" });
    expect(res.status).toBe(403);
    expect((await res.json()).error.message).toMatch(/did not come from a Solvatlas page/);
  });

  it("no Origin and no Referer: 403; a Referer from our host is enough", async () => {
    expect((await measure({ cookie })).status).toBe(403);
    // Past the origin check the photo is looked up: 404 means the request was let through.
    expect((await measure({ cookie, referer: "http://localhost:3000/bench" })).status).toBe(404);
  });

  it("a token-authenticated call needs no Origin (tokens do not ride along on cross-site requests)", async () => {
    expect((await measure({ authorization: `Bearer ${tokenFor("chemist")}` })).status).toBe(404);
  });
});
