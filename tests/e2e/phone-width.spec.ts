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
    const [scroll, client] = await page.evaluate(() => [document.documentElement.scrollWidth, document.documentElement.clientWidth]);
    if (scroll > client) wide.push(`${path}: ${scroll} px wide on a ${client} px screen`);
  }
  expect(wide).toEqual([]);
});
