// What can I grow here: the spot page's year charts and plants, comparing spots, a plant's needs
// with their sources, and the wishlist — as the demo owner, against the demo household.
import { test, expect, signIn, DEMO } from "./fixtures";

test("the spot page folds the day-by-day year, the dew-point margin and the numbers under its answer, and lists the plants standing there", async ({
  page,
}) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1");
  await page
    .getByRole("link", { name: /Spare room/ })
    .first()
    .click();
  await page.getByTestId("fold-days").locator(":scope > summary").click();
  for (const id of ["chart-year", "chart-margin"]) {
    await expect(page.getByTestId(id).locator("canvas")).toHaveCount(1);
  }
  await expect(page.getByTestId("chart-year").locator("canvas")).toBeVisible();
  // The monthly envelope chart is gone: the year strip draws the same figures (issue 17).
  await expect(page.getByTestId("chart-envelope")).toHaveCount(0);
  await page.getByTestId("fold-numbers").locator(":scope > summary").click();
  await expect(page.getByTestId("season-table")).toBeVisible();
  await expect(page.getByTestId("season-table")).toContainText("January");
  await expect(page.getByTestId("inventory")).toContainText("Blush");
  await expect(page.getByTestId("inventory")).toContainText("Most tender");
  await expect(page.getByTestId("direct-sun")).toBeVisible();
});

test("compare two spots", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/compare");
  for (const box of await page.getByRole("checkbox").all()) await box.uncheck();
  await page.getByRole("checkbox", { name: "Bathroom shelf" }).check();
  await page.getByRole("checkbox", { name: "Bench under the pear tree" }).check();
  await page.getByRole("button", { name: "Compare" }).click();
  await expect(page).toHaveURL(/spots=\d+.*spots=\d+/);
  const table = page.getByTestId("compare-table");
  await expect(table.getByRole("columnheader", { name: "Bathroom shelf" })).toBeVisible();
  await expect(table.getByRole("columnheader", { name: "Bench under the pear tree" })).toBeVisible();
  await expect(page.getByTestId("chart-compare").locator("canvas")).toHaveCount(1);
  await expect(page.getByTestId("compare-key")).toContainText("Bathroom shelf");

  // One spot is not a comparison.
  await page.getByRole("checkbox", { name: "Bench under the pear tree" }).uncheck();
  await page.getByRole("button", { name: "Compare" }).click();
  await expect(page.getByText("Choose at least two spots to compare.")).toBeVisible();
});

test("a plant's page shows every need with its source and where it could live", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/plants");
  await page.getByLabel("Search").fill("moth");
  await page.getByRole("button", { name: "Show" }).click();
  await expect(page.getByTestId("plant-list").getByRole("listitem")).toHaveCount(1);
  await page.getByRole("link", { name: "Phalaenopsis (moth orchid)" }).click();
  await expect(page.getByRole("heading", { name: "Phalaenopsis (moth orchid)" })).toBeVisible();
  const needs = page.getByTestId("plant-needs");
  await expect(needs).toContainText("American Orchid Society culture sheet");
  await expect(needs).toContainText("Blanchard & Runkle (2006)");
  await expect(needs.getByText("from memory").first()).toBeVisible();
  await expect(page.getByTestId("plant-spots").getByRole("listitem")).toHaveCount(5);
});

test("add a plant to the wishlist", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/wishlist");
  const form = page.getByRole("form", { name: "Add to the wishlist" });
  await form.getByLabel("Plant").selectOption({ label: "Vanda and Ascocenda" });
  await form.getByLabel("Pots").fill("2");
  await form.getByLabel("Must-have").check();
  await form.getByRole("button", { name: "Add to the wishlist" }).click();
  const item = page.getByTestId("wishlist").getByRole("listitem").filter({ hasText: "Vanda" });
  await expect(item).toContainText("must-have");
  await expect(item).toContainText("2 pots");
  await expect(item).toContainText(/Best spot:/);
});
