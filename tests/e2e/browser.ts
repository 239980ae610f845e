import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, beforeEach, inject } from "vitest";

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
  // A failure on a CI machine is read from the log alone: say what each open page showed and what the
  // server logged last, and keep a screenshot of the page.
  beforeEach(({ onTestFailed }) => {
    onTestFailed(async () => {
      for (const page of (context?.pages() ?? []).filter((p) => p.url() !== "about:blank")) {
        const text = await page.locator("body").innerText({ timeout: 2_000 }).catch(() => "(the page could not be read)");
        const shot = path.join(os.tmpdir(), `solvatlas-e2e-failure-${Date.now()}.png`);
        const saved = await page.screenshot({ path: shot, timeout: 5_000 }).then(() => shot, () => "none");
        console.error(`[e2e failure] page ${page.url()} (screenshot ${saved}) showed:\n${text.slice(0, 2_000)}`);
      }
      const log = path.join(inject("dataDir"), "server.log");
      const tail = fs.existsSync(log) ? fs.readFileSync(log, "utf8").split("\n").filter((l) => !l.includes("/_next/static/")).slice(-40).join("\n") : "(no server log)";
      console.error(`[e2e failure] last lines of ${log}:\n${tail}`);
    });
  });
  return () => {
    if (!context) throw new Error("The browser is not open yet");
    return context;
  };
}
