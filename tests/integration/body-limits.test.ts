/**
 * Request-body limits (issue 11, defect 2): bodies are counted as they stream and refused at the limit
 * with 413, also when no Content-Length is sent. The client here would send 300 MB in 1 MB chunks; the
 * test counts how much of it the server pulled. The limits themselves are this app's settings
 * (MAX_BODY_MB, MAX_UPLOAD_MB), not published values.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { POST as uploadPhoto } from "@/app/api/photos/route";
import { POST as measurePhoto } from "@/app/api/photos/[id]/measure/route";
import { bodyLimitBytes } from "@/lib/config/env";
import { photoLimits } from "@/lib/storage/limits";
import { buildWorld, tokenFor } from "../support/world";

const MB = 1048576;
const ADVERTISED = 300 * MB;
/** Past this the test's client gives up (so the old code could not buffer 300 MB on a shared machine). */
const GIVE_UP_AFTER = 80 * MB;

/** A body the client streams chunk by chunk, with no Content-Length; `pulled` says how much the server read. */
function streamedBody(prefix: string, filler: number) {
  const counter = { pulled: 0 };
  const chunk = new Uint8Array(MB).fill(filler);
  const head = new TextEncoder().encode(prefix);
  let sentHead = false;
  const stream = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (!sentHead) {
        sentHead = true;
        counter.pulled += head.byteLength;
        controller.enqueue(head);
        return;
      }
      if (counter.pulled >= GIVE_UP_AFTER || counter.pulled >= ADVERTISED) {
        controller.error(new Error("client gave up: the server kept reading"));
        return;
      }
      counter.pulled += chunk.byteLength;
      controller.enqueue(chunk);
    },
  });
  return { stream, counter };
}

function post(url: string, body: ReadableStream<Uint8Array>, headers: Record<string, string>) {
  return new Request(url, { method: "POST", body, headers, duplex: "half" } as RequestInit & { duplex: "half" });
}

beforeAll(async () => {
  await buildWorld();
});

describe("request bodies are counted as they stream", () => {
  it("a chunked JSON body to the measure route stops at MAX_BODY_MB with 413", async () => {
    const { stream, counter } = streamedBody('{"vials":[{"key":"', 0x61);
    const res = await measurePhoto(
      post("http://localhost:3000/api/photos/ph_x/measure", stream, { authorization: `Bearer ${tokenFor("chemist")}`, "content-type": "application/json" }),
      { params: Promise.resolve({ id: "ph_x" }) },
    );
    expect(res.status).toBe(413);
    const body = await res.json();
    expect(body.error.code).toBe("too_large");
    expect(body.error.message).toMatch(/larger than .* MB/);
    expect(counter.pulled).toBeLessThanOrEqual(bodyLimitBytes() + 3 * MB);
  });

  it("a declared Content-Length over the limit is refused before reading", async () => {
    const { stream, counter } = streamedBody("{", 0x20);
    const res = await measurePhoto(
      post("http://localhost:3000/api/photos/ph_x/measure", stream, { authorization: `Bearer ${tokenFor("chemist")}`, "content-type": "application/json", "content-length": String(200 * MB) }),
      { params: Promise.resolve({ id: "ph_x" }) },
    );
    expect(res.status).toBe(413);
    expect(counter.pulled).toBeLessThanOrEqual(MB + 64);
  });

  it("a 300 MB chunked photo upload without Content-Length stops at MAX_UPLOAD_MB with 413", async () => {
    const boundary = "----solvatlasTestBoundary";
    const { stream, counter } = streamedBody(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.jpg"\r\nContent-Type: image/jpeg\r\n\r\n\xff\xd8\xff`, 0x00);
    const res = await uploadPhoto(post("http://localhost:3000/api/photos", stream, { authorization: `Bearer ${tokenFor("chemist")}`, "content-type": `multipart/form-data; boundary=${boundary}` }));
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toMatch(/photos up to \d+ MB are accepted/);
    // One 1 MB chunk past the limit, plus one the stream reads ahead.
    expect(counter.pulled).toBeLessThanOrEqual(photoLimits().maxBytes + 3 * MB);
    expect(counter.pulled).toBeLessThan(ADVERTISED);
  });
});
