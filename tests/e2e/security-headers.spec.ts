// The production build's security headers, and its Content-Security-Policy against the app's own
// pages in Chromium: no script of ours is refused (React Router's inline scripts carry the nonce),
// charts (uPlot) included, on full loads and client-side navigations. Header choices: OWASP HTTP
// Headers Cheat Sheet (CSP with frame-ancestors, X-Content-Type-Options, Referrer-Policy).
import type { Page, Response } from "@playwright/test";
import { test, expect, signIn, DEMO } from "./fixtures";

// Every violation is also a console error, which fails the test through the fixture; this records
// them for a clearer message.
async function watchViolations(page: Page) {
  await page.addInitScript(() => {
    (window as unknown as { cspViolations: string[] }).cspViolations = [];
    document.addEventListener("securitypolicyviolation", (e) =>
      (window as unknown as { cspViolations: string[] }).cspViolations.push(`${e.violatedDirective} ${e.blockedURI}`),
    );
  });
}
const violations = (page: Page) =>
  page.evaluate(() => (window as unknown as { cspViolations: string[] }).cspViolations);

function expectHeaders(res: Response | null, what: string) {
  expect(res, what).not.toBeNull();
  const h = res!.headers();
  const csp = h["content-security-policy"] ?? "";
  expect(csp, what).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+'(;|$)/);
  expect(csp, what).not.toContain("unsafe-eval");
  expect(csp, what).toContain("frame-ancestors 'none'");
  expect(h["x-content-type-options"], what).toBe("nosniff");
  expect(h["referrer-policy"], what).toBe("same-origin");
}

test("every page carries the security headers, and the CSP refuses none of the app's own scripts", async ({ page }) => {
  await watchViolations(page);
  expectHeaders(await page.goto("/sign-in"), "/sign-in");
  expect(await violations(page)).toEqual([]);
  await signIn(page, DEMO.owner);
  for (const path of [
    "/",
    "/sites/1",
    "/sites/1/compare",
    "/sites/1/import",
    "/sites/1/water",
    "/sites/1/plants",
    "/sites/1/alerts",
    "/settings",
  ]) {
    expectHeaders(await page.goto(path), path);
    await page.waitForLoadState("networkidle");
    expect(await violations(page), path).toEqual([]);
  }
  // A spot page's charts, reached by a client-side navigation from the site page.
  await page.goto("/sites/1");
  await page
    .getByRole("link", { name: /Spare room/ })
    .first()
    .click();
  await expect(page.getByTestId("chart-year").locator("canvas")).toHaveCount(1);
  expect(await violations(page)).toEqual([]);
  // The same page loaded whole.
  expectHeaders(await page.reload(), "spot page");
  await expect(page.getByTestId("chart-year").locator("canvas")).toHaveCount(1);
  expect(await violations(page)).toEqual([]);
});

test("static files carry nosniff and the frame policy too", async ({ request }) => {
  const res = await request.get("/favicon.svg");
  expect(res.status()).toBe(200);
  expect(res.headers()["x-content-type-options"]).toBe("nosniff");
  expect(res.headers()["content-security-policy"]).toContain("frame-ancestors 'none'");
});
