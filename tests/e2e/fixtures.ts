import { test as base, expect, type Page } from "@playwright/test";

export const DEMO = {
  owner: { email: "owner@nichewise.test", password: "greenhouse-demo-1" },
  carer: { email: "carer@nichewise.test", password: "greenhouse-demo-2" },
  mentor: { email: "mentor@nichewise.test", password: "greenhouse-demo-3" },
  admin: { email: "admin@nichewise.test", password: "greenhouse-admin-4" },
};

// Every page fails its test on a console error or an uncaught exception.
export const test = base.extend<{ page: Page }>({
  page: async ({ page }, use) => {
    const errors: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error") errors.push(m.text());
    });
    page.on("pageerror", (e) => errors.push(e.message));
    await use(page);
    expect(errors, "console errors on the page").toEqual([]);
  },
});

export async function signIn(page: Page, who: { email: string; password: string }) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(who.email);
  await page.getByLabel("Password").fill(who.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("heading", { name: "My sites" })).toBeVisible();
}

export { expect };
