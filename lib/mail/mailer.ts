/**
 * Outgoing mail. With SMTP_URL set, messages go through that server; otherwise each message is
 * written as JSON into a local mailbox folder (DATA_DIR/mailbox) that admins can read in the app,
 * so invitations and resets work on a fresh machine with no mail server.
 */
import fs from "node:fs";
import path from "node:path";
import { randomBytes } from "node:crypto";
import nodemailer from "nodemailer";

export type OutgoingMail = { to: string; subject: string; text: string };
export type MailConfig = { smtpUrl?: string; from: string; mailboxDir: string };
export type StoredMail = { id: string; at: string; from: string; to: string; subject: string; text: string };

/** Microseconds since the epoch, strictly increasing within this process, so names sort in sending order. */
let lastStamp = 0;
function nextStamp(): number {
  lastStamp = Math.max(Date.now() * 1000, lastStamp + 1);
  return lastStamp;
}

export async function sendMail(config: MailConfig, mail: OutgoingMail): Promise<{ id: string; via: "smtp" | "mailbox" }> {
  if (config.smtpUrl) {
    const transport = nodemailer.createTransport(config.smtpUrl);
    const info = await transport.sendMail({ from: config.from, to: mail.to, subject: mail.subject, text: mail.text });
    return { id: info.messageId, via: "smtp" };
  }
  fs.mkdirSync(config.mailboxDir, { recursive: true });
  const at = new Date();
  const id = `${String(nextStamp()).padStart(17, "0")}-${randomBytes(4).toString("hex")}`;
  const stored: StoredMail = { id, at: at.toISOString(), from: config.from, to: mail.to, subject: mail.subject, text: mail.text };
  const file = path.join(config.mailboxDir, `${id}.json`);
  const temp = `${file}.${process.pid}.tmp`;
  fs.writeFileSync(temp, JSON.stringify(stored, null, 2));
  fs.renameSync(temp, file);
  return { id, via: "mailbox" };
}

/** Messages in the local mailbox, newest first. */
export function readMailbox(mailboxDir: string, { limit = 100 }: { limit?: number } = {}): StoredMail[] {
  if (!fs.existsSync(mailboxDir)) return [];
  return fs
    .readdirSync(mailboxDir)
    .filter((f) => f.endsWith(".json"))
    .sort()
    .reverse()
    .slice(0, limit)
    .map((f) => JSON.parse(fs.readFileSync(path.join(mailboxDir, f), "utf8")) as StoredMail);
}
