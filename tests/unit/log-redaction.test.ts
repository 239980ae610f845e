/**
 * Server log lines (lib/log/logger.ts) never carry passwords, API tokens, session cookies or the secret
 * part of invitation and reset links. The logger writes real JSON lines to a stream read back here.
 */
import { Writable } from "node:stream";
import { describe, expect, it } from "vitest";
import { createLogger, REDACTED, requestIdFrom, safeUrl } from "@/lib/log/logger";

function capture() {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, done) {
      lines.push(...chunk.toString().split("\n").filter(Boolean));
      done();
    },
  });
  return { logger: createLogger(stream, "debug"), lines };
}

const TOKEN = "sva_Q2hlbWlzdFRva2VuRm9yVGVzdHNPbmx5MTIzNDU2Nzg";
const PASSWORD = "correct horse battery";
const SESSION = "sess9f8e7d6c5b4a";

describe("log redaction", () => {
  it("blanks passwords, tokens, cookies and Authorization headers at any depth and keeps the rest", () => {
    const { logger, lines } = capture();
    logger.info({ req: { method: "POST", headers: { authorization: `Bearer ${TOKEN}`, cookie: `auth_session=${SESSION}`, host: "lab.example" } } }, "request");
    logger.warn({ password: PASSWORD, email: "chemist@lab.test" }, "sign-in failed");
    logger.error({ body: { token: TOKEN, form: { newPassword: PASSWORD, currentPassword: PASSWORD } } }, "action failed");
    logger.info({ res: { headers: { "set-cookie": `auth_session=${SESSION}; HttpOnly` } } }, "response");
    expect(lines).toHaveLength(4);
    const all = lines.join("\n");
    for (const secret of [TOKEN, PASSWORD, SESSION]) expect(all).not.toContain(secret);
    const parsed = lines.map((l) => JSON.parse(l));
    expect(parsed[0].req.headers.authorization).toBe(REDACTED);
    expect(parsed[0].req.headers.host).toBe("lab.example");
    expect(parsed[1].email).toBe("chemist@lab.test");
    expect(parsed[2].body.form.newPassword).toBe(REDACTED);
    expect(parsed[3].res.headers["set-cookie"]).toBe(REDACTED);
  });

  it("writes one JSON object per line with level, time and message", () => {
    const { logger, lines } = capture();
    logger.info({ reqId: "abc-123" }, "request");
    const line = JSON.parse(lines[0]);
    expect(line).toMatchObject({ level: "info", msg: "request", reqId: "abc-123", service: "solvatlas" });
    expect(new Date(line.time).getTime()).not.toBeNaN();
  });

  it("removes the secret part of invitation and reset links and secret-looking query parameters from URLs", () => {
    expect(safeUrl("/reset/Zm9vYmFyc2VjcmV0")).toBe(`/reset/${REDACTED}`);
    expect(safeUrl("/invite/abc123?next=/bench")).toBe(`/invite/${REDACTED}?next=%2Fbench`);
    expect(safeUrl(`/api/dyes?q=violet&token=${TOKEN}`)).toBe(`/api/dyes?q=violet&token=${REDACTED}`);
    expect(safeUrl("/api/search?lab=50,20,-30&limit=20")).toBe("/api/search?lab=50%2C20%2C-30&limit=20");
    expect(safeUrl("/catalogue/KB-101")).toBe("/catalogue/KB-101");
  });

  it("keeps a plain caller-supplied request id and replaces anything else", () => {
    expect(requestIdFrom("lab-script.42", () => "new")).toBe("lab-script.42");
    expect(requestIdFrom("two words", () => "new")).toBe("new");
    expect(requestIdFrom("x".repeat(65), () => "new")).toBe("new");
    expect(requestIdFrom(undefined, () => "new")).toBe("new");
  });
});
