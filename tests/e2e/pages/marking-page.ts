import type { Locator, Page } from "playwright-core";

/** The marking editor at /bench/photos/[id]: draws regions by dragging on the photo, in photo pixels. */
export class MarkingPage {
  constructor(
    private readonly page: Page,
    private readonly photo: { width: number; height: number },
  ) {}

  canvas(): Locator {
    return this.page.locator('[data-testid="marking-canvas"][data-ready="true"]');
  }

  async chooseNewRegion(role: "Vial" | "Reference", shape: "Rectangle" | "Ellipse" = "Rectangle") {
    await this.page.getByRole("button", { name: role, exact: true }).click();
    await this.page.getByRole("button", { name: shape, exact: true }).click();
  }

  /** Drags out a region from (x, y) to (x + w, y + h), given in photo pixels. */
  async draw(region: { x: number; y: number; w: number; h: number }) {
    await this.canvas().scrollIntoViewIfNeeded();
    const box = (await this.canvas().boundingBox())!;
    const sx = box.width / this.photo.width;
    const sy = box.height / this.photo.height;
    await this.page.mouse.move(box.x + region.x * sx, box.y + region.y * sy);
    await this.page.mouse.down();
    await this.page.mouse.move(box.x + (region.x + region.w / 2) * sx, box.y + (region.y + region.h / 2) * sy, { steps: 4 });
    await this.page.mouse.move(box.x + (region.x + region.w) * sx, box.y + (region.y + region.h) * sy, { steps: 4 });
    await this.page.mouse.up();
  }

  /**
   * Waits until the editor's live colours and replicate flags belong to the regions and inputs as they
   * are now (data-busy="false"): no measurement or replicate check is waiting or in flight.
   */
  async settled() {
    await this.page.locator('[data-testid="marking-editor"][data-busy="false"]').waitFor({ timeout: 30_000 });
  }

  /** A reference's card (references are listed under the rack table). */
  card(label: string): Locator {
    return this.page.getByTestId("region-card").and(this.page.locator(`[data-label="${label}"]`));
  }

  /** A vial's row in the rack table. */
  row(label: string): Locator {
    return this.page.getByTestId("vial-row").and(this.page.locator(`[data-label="${label}"]`));
  }

  async pickSameDye(query: string) {
    const input = this.page.getByRole("combobox", { name: "Same dye for every vial" });
    await input.click();
    await input.fill(query);
    await this.page.getByRole("listbox", { name: "Same dye for every vial: matching dyes" }).getByRole("option").first().click();
  }

  async pickDye(label: string, query: string) {
    const input = this.page.getByRole("combobox", { name: `Dye in ${label}` });
    await input.click();
    await input.fill(query);
    await this.page.getByRole("listbox", { name: `Dye in ${label}: matching dyes` }).getByRole("option").first().click();
  }
}
