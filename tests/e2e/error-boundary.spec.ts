// A page that fails inside a site keeps the site around it: the layouts have error boundaries of
// their own, so a spot id that is not there is a 404 under the site's name and menu, not a bare
// page; a site you are not a member of is a 404 that keeps the header.
import { test as base, expect } from "@playwright/test";
import { signIn, DEMO } from "./fixtures";

// As the shared fixture, failing on any console error or uncaught exception, except the browser's
// own line for the 404 document these tests ask for.
const test = base.extend({
  page: async ({ page }, use) => {
    const errors: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" && !/status of 404/.test(m.text())) errors.push(m.text());
    });
    page.on("pageerror", (e) => errors.push(e.message));
    await use(page);
    expect(errors, "console errors on the page").toEqual([]);
  },
});

test("a 404 spot inside a site keeps the site's name and menu", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1");
  const siteName = (await page.getByRole("heading", { level: 1 }).textContent())!;

  const res = await page.goto("/sites/1/spots/999999");
  expect(res?.status()).toBe(404);
  await expect(page.getByTestId("route-error").getByRole("heading", { name: "Not found" })).toBeVisible();
  await expect(page.getByRole("heading", { level: 1 })).toHaveText(siteName);
  const menu = page.getByRole("navigation", { name: "Site" });
  await expect(menu.getByRole("link", { name: "Sensors" }).last()).toBeVisible();
  await expect(page).toHaveTitle(`Not found · ${siteName} · Nichewise`);
  // The menu still works from the error.
  await menu.getByRole("link", { name: "Sensors" }).last().click();
  await expect(page).toHaveURL(/\/sites\/1\/sensors$/);
  await expect(page.getByTestId("route-error")).toHaveCount(0);

  // A sensor id that is not there, likewise.
  const res2 = await page.goto("/sites/1/sensors/999999");
  expect(res2?.status()).toBe(404);
  await expect(page.getByRole("heading", { level: 1 })).toHaveText(siteName);
  await expect(page.getByRole("navigation", { name: "Site" })).toBeVisible();
});

test("a site you are not a member of is a 404 that keeps the header", async ({ page }) => {
  await signIn(page, DEMO.owner);
  const res = await page.goto("/sites/999999");
  expect(res?.status()).toBe(404);
  await expect(page.getByRole("heading", { name: "Not found" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Sign out" })).toBeVisible();
  await expect(page.getByRole("navigation", { name: "Site" })).toHaveCount(0);
});
