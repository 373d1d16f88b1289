// Issue 17's last screen faults: the water chart's month axis, the plant page's month strips per
// fit reason, and the site menu's place on a spot's own alert watches.
import { test, expect, signIn, DEMO } from "./fixtures";

test("the water chart puts one tick per month, each month named once, in en-GB", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/water");
  const plot = page.getByTestId("water-chart").getByRole("img");
  await expect(plot).toHaveAttribute("data-x-ticks", /./);
  const ticks = ((await plot.getAttribute("data-x-ticks")) ?? "").split("|").filter(Boolean);
  expect(ticks.length).toBeGreaterThan(1);
  // Months only ("Jan", "Feb 2026"): no day numbers, and never "Jan Jan Feb".
  for (const t of ticks) expect(t).toMatch(/^[A-Z][a-z]{2,3}( \d{4})?$/);
  const months = ticks.map((t) => t.slice(0, 3));
  for (let i = 1; i < months.length; i++) expect(months[i]).not.toBe(months[i - 1]);
});

test("the plant page draws a twelve-month strip under each fit reason, as the spot page does", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/plants/phalaenopsis");
  const spots = page.getByTestId("plant-spots");
  await expect(page.getByTestId("month-strip-key")).toBeVisible();
  // The demo's bench outdoors fails Phalaenopsis on cold nights (common practice: nights above about 16 °C).
  const strips = spots.getByTestId("month-strip");
  expect(await strips.count()).toBeGreaterThan(0);
  await expect(strips.first()).toHaveAttribute("aria-label", /^[A-Z][^:]+: \w/);
  await expect(strips.first().locator("[data-state]")).toHaveCount(12);
});

test("on a spot's alert watches the site menu says Alerts, not Spots; a spot's other pages stay under Spots", async ({
  page,
}) => {
  await signIn(page, DEMO.owner);
  const here = page.locator('nav[aria-label="Site"] ul.sm\\:flex [data-here]');
  await page.goto("/sites/1/spots/5/alerts");
  await expect(here).toHaveText("Alerts");
  await expect(here).toHaveAttribute("aria-current", "location");
  for (const path of ["/sites/1/spots/5", "/sites/1/spots/5/edit", "/sites/1/spots/new"]) {
    await page.goto(path);
    await expect(here).toHaveText("Spots");
  }
  await page.setViewportSize({ width: 390, height: 844 });
  await page.goto("/sites/1/spots/5/alerts");
  await expect(page.getByTestId("site-menu").locator(":scope > summary")).toContainText("Alerts");
});
