/**
 * Outgoing mail: through SMTP when configured (against a minimal SMTP peer on loopback that speaks
 * RFC 5321's basic dialogue), otherwise into the local mailbox.
 */
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readMailbox, sendMail } from "@/lib/mail/mailer";

let server: net.Server;
let port = 0;
const received: string[] = [];

beforeAll(async () => {
  server = net.createServer((socket) => {
    let inData = false;
    let buffer = "";
    let message = "";
    socket.write("220 test-peer ESMTP\r\n");
    socket.on("data", (chunk) => {
      buffer += chunk.toString("utf8");
      let idx: number;
      while ((idx = buffer.indexOf("\r\n")) >= 0) {
        const line = buffer.slice(0, idx);
        buffer = buffer.slice(idx + 2);
        if (inData) {
          if (line === ".") {
            inData = false;
            received.push(message);
            message = "";
            socket.write("250 2.0.0 queued\r\n");
          } else message += line + "\n";
          continue;
        }
        const verb = line.slice(0, 4).toUpperCase();
        if (verb === "EHLO" || verb === "HELO") socket.write("250 test-peer\r\n");
        else if (verb === "MAIL" || verb === "RCPT") socket.write("250 2.1.0 ok\r\n");
        else if (verb === "DATA") {
          inData = true;
          socket.write("354 go ahead\r\n");
        } else if (verb === "QUIT") {
          socket.write("221 bye\r\n");
          socket.end();
        } else socket.write("250 ok\r\n");
      }
    });
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  port = (server.address() as net.AddressInfo).port;
});

afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

describe("mail", () => {
  it("goes through the SMTP server named by SMTP_URL", async () => {
    const mailboxDir = fs.mkdtempSync(path.join(os.tmpdir(), "mbox-"));
    const result = await sendMail(
      { smtpUrl: `smtp://127.0.0.1:${port}`, from: "Solvatlas <lab@demo.test>", mailboxDir },
      { to: "someone@demo.test", subject: "Invitation", text: "Open https://example.test/invite/abc" },
    );
    expect(result.via).toBe("smtp");
    expect(received).toHaveLength(1);
    expect(received[0]).toMatch(/Subject: Invitation/);
    expect(received[0]).toMatch(/To: someone@demo.test/);
    expect(received[0]).toMatch(/invite\/abc/);
    expect(readMailbox(mailboxDir)).toEqual([]);
  });

  it("is written to the local mailbox without SMTP, newest first, whole files only", async () => {
    const mailboxDir = fs.mkdtempSync(path.join(os.tmpdir(), "mbox-"));
    await sendMail({ from: "a@b.test", mailboxDir }, { to: "x@demo.test", subject: "first", text: "1" });
    await sendMail({ from: "a@b.test", mailboxDir }, { to: "y@demo.test", subject: "second", text: "2" });
    const box = readMailbox(mailboxDir);
    expect(box.map((m) => m.subject)).toEqual(["second", "first"]);
    expect(fs.readdirSync(mailboxDir).filter((f) => f.endsWith(".tmp"))).toEqual([]);
  });
});
