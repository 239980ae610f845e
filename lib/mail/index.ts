import path from "node:path";
import { dataDir, env } from "@/lib/config/env";
import { readMailbox, sendMail, type OutgoingMail } from "./mailer";

export function mailboxDir(): string {
  return path.join(dataDir(), "mailbox");
}

/** Sends through the configured transport (SMTP_URL, or the local mailbox). */
export function send(mail: OutgoingMail) {
  return sendMail({ smtpUrl: env().SMTP_URL, from: env().MAIL_FROM, mailboxDir: mailboxDir() }, mail);
}

export function localMailbox(limit = 100) {
  return readMailbox(mailboxDir(), { limit });
}

export function usingLocalMailbox(): boolean {
  return !env().SMTP_URL;
}
