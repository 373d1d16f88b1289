// Every page a grower opens fits a phone held upright: nothing wider than the screen, so nothing to
// scroll sideways for (wide tables and code scroll inside their own box). 390 px is a common
// phone width in CSS pixels (common practice; from memory).
import { test, expect, signIn, DEMO } from "./fixtures";
import { OWNER_PAGES } from "./pages";

test.use({ viewport: { width: 390, height: 844 } });

test("every page of the demo site fits a 390 px wide phone screen", async ({ page }) => {
  await signIn(page, DEMO.owner);
  const wide: string[] = [];
  for (const path of OWNER_PAGES) {
    const res = await page.goto(path);
    expect(res?.status(), path).toBe(200);
    await page.waitForLoadState("networkidle");
    const [scroll, client] = await page.evaluate(() => [
      document.documentElement.scrollWidth,
      document.documentElement.clientWidth,
    ]);
    if (scroll > client) wide.push(`${path}: ${scroll} px wide on a ${client} px screen`);
  }
  expect(wide).toEqual([]);
});

test("the wishlist's room in each spot reads as cards on a phone, each with its Left in view", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/wishlist");
  const left = page.getByTestId("room-left");
  expect(await left.count()).toBeGreaterThan(0);
  for (const cell of await left.all()) {
    await expect(cell).toBeVisible();
    const box = (await cell.boundingBox())!;
    expect(box.x + box.width).toBeLessThanOrEqual(390);
    // The label comes with the cell on a stacked card.
    expect(await cell.evaluate((el) => getComputedStyle(el, "::before").content)).toBe('"Left"');
  }
});

test("each fit reason on a spot page carries its twelve-month strip, named for screen readers", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/spots/1");
  await page.evaluate(() => document.querySelectorAll("details").forEach((d) => (d.open = true)));
  const strips = page.getByTestId("month-strip");
  expect(await strips.count()).toBeGreaterThan(0);
  const first = strips.first();
  await expect(first).toHaveAttribute("role", "img");
  await expect(first).toHaveAttribute(
    "aria-label",
    /^(Cold nights|Warm nights|Hot days|Humidity|Light|Condensation): (likely )?(fails|asks for care|passes|not measured)/,
  );
  expect(await first.locator("[data-state]").count()).toBe(12);
  await expect(page.getByTestId("month-strip-key").first()).toContainText("not measured");
});
