// Every page checked by axe-core (Deque's engine for WCAG rules) at a phone's and a desktop's width,
// with <details> opened so the tables behind the charts are checked too: no serious or critical
// violation of WCAG 2.2 A/AA (the standard; axe's tags wcag2a … wcag22aa). The page list is the
// phone-width spec's, plus the signed-out pages and the admin's.
import AxeBuilder from "@axe-core/playwright";
import { test as plain } from "@playwright/test";
import type { Page } from "@playwright/test";
import { test, expect, signIn, DEMO } from "./fixtures";
import { OWNER_PAGES as SITE_PAGES } from "./pages";

const SIGNED_OUT = ["/sign-in", "/sign-up"];
const OWNER_PAGES = [...new Set(["/", "/sites/new", ...SITE_PAGES])];
const ADMIN_PAGES = ["/admin"];

async function violations(page: Page, path: string) {
  const res = await page.goto(path);
  expect(res?.status(), path).toBe(200);
  await page.waitForLoadState("networkidle");
  await page.evaluate(() => document.querySelectorAll("details").forEach((d) => (d.open = true)));
  const result = await new AxeBuilder({ page })
    .withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"])
    .analyze();
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map(
      (v) =>
        `${path}: ${v.id} (${v.impact}) ${v.nodes.length}× e.g. ` +
        `${v.nodes[0]?.target.join(" ")} — ` +
        `${v.nodes[0]?.failureSummary?.split("\n")[1]?.trim() ?? v.help}`,
    );
}

for (const width of [390, 1280]) {
  test.describe(`at ${width} px`, () => {
    test.use({ viewport: { width, height: width < 600 ? 844 : 900 } });

    test("signed-out pages have no serious or critical WCAG 2.2 AA violations", async ({ page }) => {
      const found: string[] = [];
      for (const path of SIGNED_OUT) found.push(...(await violations(page, path)));
      expect(found).toEqual([]);
    });

    test("the owner's pages have no serious or critical WCAG 2.2 AA violations", async ({ page }) => {
      test.setTimeout(240_000);
      await signIn(page, DEMO.owner);
      const found: string[] = [];
      for (const path of OWNER_PAGES) found.push(...(await violations(page, path)));
      expect(found).toEqual([]);
    });

    test("the admin's page has no serious or critical WCAG 2.2 AA violations", async ({ page }) => {
      await page.goto("/sign-in");
      await page.getByLabel("E-mail").fill(DEMO.admin.email);
      await page.getByLabel("Password").fill(DEMO.admin.password);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
      const found: string[] = [];
      for (const path of ADMIN_PAGES) found.push(...(await violations(page, path)));
      expect(found).toEqual([]);
    });
  });
}

test("a skip link is the first thing the keyboard reaches and lands on the page's content", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/wishlist");
  await page.keyboard.press("Tab");
  const skip = page.getByRole("link", { name: "Skip to the page" });
  await expect(skip).toBeFocused();
  await expect(skip).toBeInViewport();
  await page.keyboard.press("Enter");
  await expect(page).toHaveURL(/#main$/);
});

// Not the fixture: the browser logs the 403 document itself as a console error.
plain(
  "a page the role may not open is titled by its status in words, not '403 Internal Server Error'",
  async ({ page }) => {
    await page.goto("/sign-in");
    await page.getByLabel("E-mail").fill(DEMO.carer.email);
    await page.getByLabel("Password").fill(DEMO.carer.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
    const res = await page.goto("/sites/1/edit");
    expect(res?.status()).toBe(403);
    // Inside a site the site's name stays the page's h1 (its error boundary keeps the menu); the status is the next heading.
    await expect(page.getByRole("heading", { name: "Not allowed" })).toBeVisible();
    await expect(page).toHaveTitle(/Not allowed/);
    await expect(page.locator("body")).not.toContainText("Internal Server Error");
  },
);
