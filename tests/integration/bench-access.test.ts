/**
 * Who may call the bench's endpoints: every route handler and server action added for the bench, for
 * an anonymous caller, each role and a deactivated account. Real sessions and tokens.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { POST as uploadPhoto, GET as listPhotos } from "@/app/api/photos/route";
import { POST as measure } from "@/app/api/photos/[id]/measure/route";
import { GET as photoImage } from "@/app/api/photos/[id]/image/route";
import { POST as sweep } from "@/app/api/photos/sweep/route";
import { GET as measurementsApi } from "@/app/api/measurements/route";
import { deleteTemplateAction, saveMeasurementsAction, saveTemplateAction } from "@/app/actions/bench";
import { db } from "@/db/client";
import { storePhoto } from "@/db/queries/photos";
import { objectStore } from "@/lib/storage";
import { actAs, buildWorld, form, PEOPLE, sessionCookieFor, tokenFor, type Who } from "../support/world";
import { smallJpeg } from "../support/photos";

type Caller = Who | "anonymous";
const CALLERS: Caller[] = ["anonymous", "admin", "chemist", "formulator", "retired"];
let photoId: string;

beforeAll(async () => {
  await buildWorld();
  photoId = (await storePhoto(db(), objectStore(), { bytes: await smallJpeg(4242, 200), originalName: "a.jpg", uploaderId: PEOPLE.chemist.id, limits: { maxBytes: 1e8, maxPixels: 1e8 } })).photo.id;
});

async function headers(caller: Caller, { cookie = false } = {}): Promise<Record<string, string>> {
  if (caller === "anonymous") return {};
  if (cookie) return { cookie: await sessionCookieFor(caller), origin: "http://localhost:3000", host: "localhost:3000" };
  return { authorization: `Bearer ${tokenFor(caller)}` };
}

const expected = (caller: Caller, allowed: readonly Caller[]) => (allowed.includes(caller) ? "allowed" : caller === "anonymous" || caller === "retired" ? 401 : 403);

type RouteCase = { name: string; allowed: readonly Caller[]; call: (h: Record<string, string>) => Promise<Response> };
const ROUTES: RouteCase[] = [
  {
    name: "POST /api/photos",
    allowed: ["admin", "chemist"],
    call: async (h) => {
      const f = new FormData();
      f.append("file", new File([new Uint8Array(await smallJpeg(Math.floor(Math.random() * 1e6)))], "x.jpg", { type: "image/jpeg" }));
      return uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: f, headers: h }));
    },
  },
  { name: "GET /api/photos", allowed: ["admin", "chemist"], call: (h) => listPhotos(new Request("http://localhost:3000/api/photos", { headers: h })) },
  {
    name: "GET /api/photos/[id]/image",
    allowed: ["admin", "chemist", "formulator"],
    call: (h) => photoImage(new Request(`http://localhost:3000/api/photos/${photoId}/image?size=thumb`, { headers: h }), { params: Promise.resolve({ id: photoId }) }),
  },
  {
    name: "POST /api/photos/[id]/measure",
    allowed: ["admin", "chemist"],
    call: (h) =>
      measure(new Request(`http://localhost:3000/api/photos/${photoId}/measure`, { method: "POST", headers: { ...h, "content-type": "application/json" }, body: JSON.stringify({ vials: [{ key: "a", region: { shape: "rect", x: 10, y: 10, w: 50, h: 50 } }] }) }), {
        params: Promise.resolve({ id: photoId }),
      }),
  },
  { name: "POST /api/photos/sweep", allowed: ["admin"], call: (h) => sweep(new Request("http://localhost:3000/api/photos/sweep?dryRun=true", { method: "POST", headers: h })) },
  { name: "GET /api/measurements", allowed: ["admin", "chemist", "formulator"], call: (h) => measurementsApi(new Request("http://localhost:3000/api/measurements", { headers: h })) },
];

describe.each(ROUTES)("$name", (route) => {
  it.each(CALLERS)("as %s (token)", async (caller) => {
    const res = await route.call(await headers(caller));
    const want = expected(caller, route.allowed);
    if (want === "allowed") expect(res.status, await res.clone().text()).toBeLessThan(300);
    else expect(res.status).toBe(want);
  });
});

it("refuses a cookie-authenticated upload from another site (no same-origin)", async () => {
  const f = new FormData();
  f.append("file", new File([new Uint8Array(await smallJpeg(777))], "x.jpg", { type: "image/jpeg" }));
  const res = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: f, headers: { cookie: await sessionCookieFor("chemist"), origin: "https://elsewhere.example", host: "localhost:3000" } }));
  expect(res.status).toBe(403);
  expect((await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: f, headers: await headers("chemist", { cookie: true }) }))).status).toBe(201);
});

type ActionCase = { name: string; allowed: readonly Caller[]; run: () => Promise<{ ok: boolean; code?: string } | null> };
// Rack layouts belong to whoever saved them (only they or an admin overwrite one): each caller saves its own name.
let layoutSerial = 0;
const ACTIONS: ActionCase[] = [
  { name: "save measurements", allowed: ["admin", "chemist"], run: () => saveMeasurementsAction(null, form({ payload: JSON.stringify({ photoId, vials: [] }) })) },
  { name: "save a rack layout", allowed: ["admin", "chemist"], run: () => saveTemplateAction(null, form({ payload: JSON.stringify({ name: `L${++layoutSerial}`, regions: [{ shape: "rect", x: 0.1, y: 0.1, w: 0.1, h: 0.1, role: "vial", label: "Vial 1" }] }) })) },
  { name: "delete a rack layout", allowed: ["admin", "chemist"], run: () => deleteTemplateAction(null, form({ id: "rt_missing" })) },
];

describe.each(ACTIONS)("server action: $name", (action) => {
  it.each(CALLERS)("as %s", async (caller) => {
    await actAs(caller);
    const state = await action.run();
    const want = expected(caller, action.allowed);
    if (want === "allowed") {
      expect(state?.code).not.toBe("unauthenticated");
      expect(state?.code).not.toBe("forbidden");
    } else expect(state).toMatchObject({ ok: false, code: want === 401 ? "unauthenticated" : "forbidden" });
  });
});
