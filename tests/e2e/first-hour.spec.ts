import { execFileSync } from "node:child_process";
import { test, expect, signIn, DEMO } from "./fixtures";

test("sign up, create a site, add a spot, add a sensor, see its secret once, connect it, place and move it", async ({
  page,
}) => {
  const email = `grower${Date.now()}@example.test`;
  await page.goto("/sign-up");
  await page.getByLabel("Your name").fill("Ada Grower");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("short");
  await page.getByRole("button", { name: "Create account" }).click();
  await expect(page.getByText("Use at least 10 characters")).toBeVisible();
  // What was typed is kept.
  await expect(page.getByLabel("E-mail")).toHaveValue(email);
  await page.getByLabel("Password").fill("a sensible password");
  await page.getByRole("button", { name: "Create account" }).click();
  await expect(page.getByRole("heading", { name: "My sites" })).toBeVisible();

  await page.getByRole("link", { name: "New site" }).click();
  await page.getByLabel("Name").fill("Flat 3");
  await page.getByLabel("Latitude (°, north positive)").fill("95");
  await page.getByLabel("Longitude (°, east positive)").fill("-1.5");
  await page.getByRole("button", { name: "Create site" }).click();
  await expect(page.getByText("Latitude is between −90 and 90")).toBeVisible();
  await page.getByLabel("Latitude (°, north positive)").fill("53.4");
  await page.getByLabel("Time zone").selectOption("Europe/London");
  await page.getByRole("button", { name: "Create site" }).click();
  await expect(page.getByRole("heading", { name: "Flat 3" })).toBeVisible();

  for (const [name, facing] of [
    ["Bedroom sill", "S"],
    ["Hall shelf", "none"],
  ] as const) {
    await page.getByRole("link", { name: "Add a spot" }).click();
    await page.getByLabel("Name").fill(name);
    await page.getByLabel("Window facing").selectOption(facing);
    await page.getByLabel("Room for how many pots").fill("4");
    await page.getByRole("button", { name: "Add spot" }).click();
    await expect(page.getByRole("heading", { name })).toBeVisible();
    await page.getByRole("link", { name: "Spots" }).click();
  }

  await page.getByRole("link", { name: "Sensors" }).click();
  await page.getByRole("link", { name: "Add a sensor" }).click();
  await page.getByLabel("Name").fill("Sill sensor");
  await page.getByRole("button", { name: "Add sensor" }).click();
  const secret = (await page.getByTestId("secret").textContent())!.trim();
  expect(secret).toMatch(/^[a-z2-7]{32}$/);
  await expect(page.getByTestId("waiting")).toBeVisible();

  // Publish the first reading with Debian's mosquitto_pub exactly as the page shows it.
  const command = (await page.getByTestId("mosquitto").textContent())!;
  expect(command).toContain(secret);
  execFileSync("bash", ["-c", command], { timeout: 15_000 });
  await expect(page.getByTestId("first-reading")).toBeVisible({ timeout: 15_000 });

  // Shown once: after a reload the secret is gone.
  await page.reload();
  await expect(page.getByTestId("secret")).toHaveCount(0);

  await page.getByLabel("Spot").selectOption({ label: "Bedroom sill" });
  await page.getByRole("button", { name: "Place it" }).click();
  await expect(page.getByTestId("placement-history")).toContainText("Bedroom sill");
  await page.getByLabel("Spot").selectOption({ label: "Hall shelf" });
  await page.getByRole("button", { name: "Place it" }).click();
  await expect(page.getByTestId("placement-history").locator("li")).toHaveCount(2);
  await expect(page.getByTestId("placement-history").locator("li").first()).toContainText("Hall shelf");
});

test("the demo owner sees the five spots and a spot's chart", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.getByRole("link", { name: /Hollins Lane/ }).click();
  for (const name of [
    "Kitchen sill (east)",
    "Landing sill (south-west)",
    "Bathroom shelf",
    "Spare room (heated)",
    "Bench under the pear tree",
  ]) {
    await expect(page.locator("ul li").getByText(name, { exact: true })).toBeVisible();
  }
  await page.locator("ul li").getByText("Bench under the pear tree", { exact: true }).click();
  // The 48-hour chart and the numbers sit one level down, under the spot's answer (issue 17).
  await page.getByTestId("fold-48h").locator(":scope > summary").click();
  await expect(page.getByTestId("chart-48h").locator("canvas")).toBeVisible();
  await expect(page.getByTestId("chart-48h")).toContainText("°C");
  await expect(page.getByTestId("year-strip")).toBeVisible();
  await page.getByTestId("fold-numbers").locator(":scope > summary").click();
  await expect(page.getByTestId("season-table")).toContainText("January");
  // Outdoors in an English winter, warm growers are ruled out.
  const phal = page.getByTestId("fit-list").locator("li", { hasText: "Phalaenopsis" }).first();
  await expect(phal).toContainText("struggles here");
});
