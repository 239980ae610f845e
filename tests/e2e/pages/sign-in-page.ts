import type { Page } from "playwright-core";

export const DEMO_PASSWORD = "solvatlas-demo";

export class SignInPage {
  constructor(
    private readonly page: Page,
    private readonly base: string,
  ) {}

  async signIn(email: string, password = DEMO_PASSWORD) {
    // Start signed out: a case that failed before signing out must not leave the next one signed in.
    await this.page.context().clearCookies();
    await this.page.goto(`${this.base}/sign-in`);
    await this.page.getByLabel("E-mail").fill(email);
    await this.page.getByLabel("Password").fill(password);
    await this.page.getByRole("button", { name: "Sign in" }).click();
    await this.page.waitForURL(`${this.base}/`);
  }

  async signOut() {
    await this.page.getByRole("button", { name: "Sign out" }).click();
    await this.page.waitForURL(`${this.base}/sign-in`);
  }

  mainNavLabels() {
    return this.page.locator("nav[aria-label=Main]").last().getByRole("link").allInnerTexts();
  }
}
