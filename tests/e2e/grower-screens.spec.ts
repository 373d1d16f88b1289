// Issue 17's charts, site form and wishlist as a grower meets them: dates in the site's locale, fixed
// spans however little was read, Nichewise's own legend, named canvases, round °F ticks, direct sun by
// month; the site form's "use my location" and browser time zone; the wishlist's reset, confirmation
// and undo.
import { test, expect, signIn, DEMO } from "./fixtures";

const ticksOf = async (page: import("@playwright/test").Page, testId: string) => {
  const plot = page.getByTestId(testId).getByRole("img");
  await expect(plot).toHaveAttribute("data-x-ticks", /./);
  return ((await plot.getAttribute("data-x-ticks")) ?? "").split("|");
};

test.describe("a new site, set up from a phone in Chicago", () => {
  // Chicago on purpose: neither the server's zone nor the old default (Europe/London).
  test.use({
    timezoneId: "America/Chicago",
    geolocation: { latitude: 41.8781, longitude: -87.6298 },
    permissions: ["geolocation"],
  });

  test("the site form takes the place from the device, and a spot without readings keeps its 48 hours and its year", async ({
    page,
  }) => {
    await page.goto("/sign-up");
    await page.getByLabel("Your name").fill("Chicago Grower");
    await page.getByLabel("E-mail").fill(`chicago${Date.now()}@example.test`);
    await page.getByLabel("Password").fill("a sensible password");
    await page.getByRole("button", { name: "Create account" }).click();
    await expect(page.getByRole("heading", { name: "My sites" })).toBeVisible();

    await page.goto("/sites/new");
    // No placeholder that could pass for a value (issue 17: "51.70", "-2.20").
    await expect(page.locator("form input[placeholder]")).toHaveCount(0);
    await expect(page.getByLabel("Time zone")).toHaveValue("America/Chicago");
    await page.getByRole("button", { name: "Use my location" }).click();
    await expect(page.getByTestId("location-status")).toContainText("Filled in from this device");
    await expect(page.getByLabel("Latitude (°, north positive)")).toHaveValue("41.88");
    await expect(page.getByLabel("Longitude (°, east positive)")).toHaveValue("-87.63");
    await page.getByLabel("Name").fill("Lakeside flat");
    await page.getByRole("button", { name: "Create site" }).click();
    await expect(page).toHaveURL(/\/sites\/\d+$/);
    const site = new URL(page.url()).pathname;

    await page.goto(`${site}/spots/new`);
    await page.getByLabel("Name").fill("Bench B");
    await page.getByRole("button", { name: "Add spot" }).click();
    await expect(page.getByRole("heading", { name: "Bench B" })).toBeVisible();

    // No readings at all: the 48-hour axis still spans two days in hours and dates (never ":23.000"),
    // the year axis twelve months of this year and last (never 2027–2029).
    await openCharts(page);
    const hours = await ticksOf(page, "chart-48h");
    expect(hours.length).toBeGreaterThan(2);
    for (const t of hours) expect(t).toMatch(/^(\d\d:\d\d|\d{1,2} [A-Z][a-z]{2,3})$/);
    const thisYear = new Date().getFullYear();
    const months = await ticksOf(page, "chart-year");
    for (const t of months) expect(t).toMatch(/^[A-Z][a-z]{2,3}( \d{4})?$/);
    for (const y of months.join(" ").match(/\d{4}/g) ?? []) expect([thisYear - 1, thisYear]).toContain(Number(y));
  });
});

test("the spot page's charts: dates in en-GB, Nichewise's legend, canvases named, direct sun by month", async ({
  page,
}) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/spots/1");
  await openCharts(page);
  // en-GB: day before month ("7 Jun"), never the US "6/7".
  const days = await ticksOf(page, "chart-48h");
  expect(days.some((t) => /^\d{1,2} [A-Z][a-z]{2,3}$/.test(t))).toBe(true);
  for (const t of days) expect(t).not.toMatch(/\d+\/\d+/);
  // No stock legend; ours names the line, its value, and the range shown with units.
  await expect(page.locator(".u-legend")).toHaveCount(0);
  const legend = page.getByTestId("chart-48h").getByTestId("chart-legend");
  await expect(legend).toContainText("°C");
  await expect(legend).toContainText("in the span shown");
  await expect(legend).toContainText("latest");
  // Pointing at the chart reads the lines there, with the time in the site's words.
  await page.getByTestId("chart-48h").getByRole("img").hover();
  await expect(legend).toContainText(/at \d{1,2} [A-Z][a-z]{2,3},? \d\d:\d\d/);
  // Canvas charts are named for screen readers by what they show.
  await expect(page.getByTestId("chart-year").getByRole("img")).toHaveAttribute(
    "aria-label",
    /from -?\d+\.\d °C to -?\d+\.\d °C/,
  );
  // Direct sun as twelve bars, named month by month.
  const sun = page.getByTestId("direct-sun-bars");
  await expect(sun).toHaveAttribute("aria-label", /Jan .*Dec /);
  // The year strip says its colours are temperatures, with a key.
  await expect(page.getByTestId("year-strip-key")).toContainText("under 5 °C");
});

test("in °F the year strip's ticks sit on round °F values, not converted 5 °C steps", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/settings");
  await page.getByRole("radio", { name: "°F" }).check();
  await page.getByRole("radio", { name: "°F" }).locator("xpath=ancestor::form").getByRole("button").click();
  await expect(page.getByText("Saved")).toBeVisible();
  try {
    await page.goto("/sites/1/spots/1");
    const ticks = await page
      .getByTestId("year-strip")
      .locator("[data-tick]")
      .evaluateAll((els) => els.map((e) => Number(e.getAttribute("data-tick"))));
    expect(ticks.length).toBeGreaterThan(2);
    for (const t of ticks) expect(t % 10).toBe(0);
    await expect(page.getByTestId("year-strip-key")).toContainText("°F");
  } finally {
    await page.goto("/settings");
    await page.getByRole("radio", { name: "°C" }).check();
    await page.getByRole("radio", { name: "°C" }).locator("xpath=ancestor::form").getByRole("button").click();
    await expect(page.getByText("Saved")).toBeVisible();
  }
});

test("the wishlist starts clean after adding, asks before a must-have goes, and can put a removed plant back", async ({
  page,
}) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/wishlist");
  const form = page.getByRole("form", { name: "Add to the wishlist" });
  await form.getByLabel("Plant").selectOption("hoya");
  await form.getByLabel("Must-have").check();
  await form.getByRole("button", { name: "Add to the wishlist" }).click();
  const item = page.getByTestId("wishlist").getByRole("listitem").filter({ hasText: "Hoya" });
  await expect(item).toContainText("must-have");
  // The next plant is not silently a must-have too.
  await expect(form.getByLabel("Must-have")).not.toBeChecked();
  await expect(form.getByLabel("Pots")).toHaveValue("1");

  // A carer's Remove of the owner's must-have asks first, and the server keeps it until confirmed.
  await page.context().clearCookies();
  await signIn(page, DEMO.carer);
  await page.goto("/sites/1/wishlist");
  await page.getByRole("button", { name: /^Remove Hoya .*from the wishlist$/ }).click();
  await expect(page.getByTestId("wish-confirm")).toContainText(/Hoya .* is a must-have/);
  await expect(item).toBeVisible();
  await page
    .getByTestId("wish-confirm")
    .getByRole("button", { name: /^Remove Hoya/ })
    .click();
  await expect(page.getByTestId("wish-removed")).toContainText(/Took Hoya .*\(a must-have\) off the wishlist/);
  await expect(item).toHaveCount(0);
  await page.getByRole("button", { name: "Put it back" }).click();
  await expect(item).toContainText("must-have");

  // Leave the demo as it was.
  await page.getByRole("button", { name: /^Remove Hoya .*from the wishlist$/ }).click();
  await page
    .getByTestId("wish-confirm")
    .getByRole("button", { name: /^Remove Hoya/ })
    .click();
  await expect(item).toHaveCount(0);
});

/** The spot page keeps its 48 hours and its days of the year one level down, in folds: open them. */
async function openCharts(page: import("@playwright/test").Page) {
  for (const fold of ["fold-48h", "fold-days"]) await page.getByTestId(fold).locator(":scope > summary").click();
}
