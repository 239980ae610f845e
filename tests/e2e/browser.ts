import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll } from "vitest";

/** Debian's Chromium, headless, with a fresh profile and no background traffic. */
export async function launchBrowser(): Promise<BrowserContext> {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-chrome-"));
  return chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    viewport: { width: 1280, height: 860 },
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
}

/** Collects console errors so a test can assert a page loaded cleanly. */
export function watchConsole(page: Page): string[] {
  const errors: string[] = [];
  // Each with the page it came from, so a failure names where to look.
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(`${page.url()}: ${m.text()}`);
  });
  page.on("pageerror", (e) => errors.push(`${page.url()}: ${e.message}`));
  return errors;
}

/** One browser per test file: opened before the first test, closed after the last. */
export function useBrowser(): () => BrowserContext {
  let context: BrowserContext | undefined;
  beforeAll(async () => {
    context = await launchBrowser();
  });
  afterAll(async () => {
    await context?.close();
  });
  return () => {
    if (!context) throw new Error("The browser is not open yet");
    return context;
  };
}
