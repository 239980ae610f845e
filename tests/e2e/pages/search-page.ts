import type { Page } from "playwright-core";

/** The colour search page: target, filters, results. */
export class SearchPage {
  constructor(
    private readonly page: Page,
    private readonly base: string,
  ) {}

  async open() {
    await this.page.goto(`${this.base}/search`);
  }

  async searchWord(word: string, medium: string) {
    await this.page.getByText("Colour word", { exact: true }).click();
    await this.page.getByLabel("Colour name").selectOption(word);
    await this.page.getByLabel("Medium").selectOption(medium);
    await this.page.getByRole("button", { name: "Search" }).click();
    await this.hits().first().waitFor();
  }

  hits() {
    return this.page.getByTestId("search-hit");
  }

  hitCodes() {
    return this.hits().locator("a").allInnerTexts();
  }
}
