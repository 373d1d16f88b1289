// Issue 15: a spot's light source and glazing are set in its form, the DLI uses the light source's
// lux factor, and a lux sensor that tops out in direct sun is named beside the light figures.
import { test, expect, signIn, DEMO } from "./fixtures";

const HOUR = 3_600_000;
// A cheap lux chip saturates at 65,535 counts ÷ 1.2 ≈ 54,612 lux (memory: BH1750-type chips);
// direct summer sun is about 100 klux (2,000 µmol m⁻² s⁻¹ × 54, Thimijan & Heins 1983).
const CHIP = 65_535 / 1.2;

test("light source and glazing are kept by the spot form, and a clipping lux sensor is named on the spot page", async ({
  page,
}) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/spots/new");
  await page.getByLabel("Name").fill("Clip test sill");
  await page.getByLabel("Window facing").selectOption("S");
  await page.getByLabel("What lights it").selectOption({ label: "Daylight and lamps together" });
  await page.getByLabel("Window glazing").selectOption("old_double");
  await page.getByRole("button", { name: "Add spot" }).click();
  await expect(page.getByRole("heading", { name: "Clip test sill" })).toBeVisible();
  const spotUrl = page.url();
  // Mixed light: halfway between sunlight's 54 and white LEDs' 70 lux per µmol.
  await expect(page.getByTestId("light-source-note")).toContainText("62 lux");
  await expect(page.getByTestId("lux-clipped")).toHaveCount(0);

  await page.goto("/sites/1/sensors/new");
  await page.getByLabel("Name").fill("Clip test chip");
  await page.getByLabel("light (lux)").check();
  await page.getByLabel("Place it in").selectOption({ label: "Clip test sill" });
  await page.getByLabel("From its first reading").check();
  await page.getByRole("button", { name: "Add sensor" }).click();
  const secret = (await page.getByTestId("secret").textContent())!.trim();
  const sensorId = Number(/sensors\/(\d+)/.exec(page.url())![1]);

  // Three sunny days ending two days ago, every 10 minutes: a half-sine of daylight over 16 hours
  // peaking at 100 klux, read by the chip that tops out.
  const start = Math.floor((Date.now() - 5 * 24 * HOUR) / HOUR) * HOUR;
  const readings = Array.from({ length: 3 * 24 * 6 }, (_, k) => {
    const x = ((k % (24 * 6)) / 6 - 4) / 16;
    const lux = x > 0 && x < 1 ? Math.round(Math.min(CHIP, 100_000 * Math.sin(Math.PI * x)) * 10) / 10 : 0;
    return { time: new Date(start + k * 600_000).toISOString(), temperature: 21, humidity: 55, lux };
  });
  const res = await page.request.post("/api/ingest", {
    headers: { Authorization: `Bearer ${sensorId}.${secret}` },
    data: { readings },
  });
  expect(res.ok()).toBe(true);

  await page.goto(spotUrl);
  await expect(page.getByTestId("lux-clipped")).toContainText(
    "tops out at about 55,000 lux: the sunniest hours read low",
  );

  // The form shows what was chosen; white LEDs alone are flat by nature, so no clipping is claimed.
  await page.goto(`${spotUrl}/edit`);
  await expect(page.getByLabel("What lights it")).toHaveValue("mixed");
  await expect(page.getByLabel("Window glazing")).toHaveValue("old_double");
  await page.getByLabel("What lights it").selectOption({ label: "White LED lamps" });
  await page.getByRole("button", { name: "Save" }).click();
  await expect(page.getByTestId("light-source-note")).toContainText("70 lux");
  await expect(page.getByTestId("lux-clipped")).toHaveCount(0);

  // Leave the demo as it was.
  await page.goto(`/sites/1/sensors/${sensorId}`);
  await page.getByLabel("Type “Clip test chip” to delete it and its readings").fill("Clip test chip");
  await page.getByRole("button", { name: "Delete sensor" }).click();
  await expect(page.getByRole("link", { name: "Add a sensor" })).toBeVisible();
  await page.goto(`${spotUrl}/edit`);
  await page.getByLabel("Type “Clip test sill” to confirm").fill("Clip test sill");
  await page.getByRole("button", { name: "Delete spot" }).click();
  await expect(page.getByRole("link", { name: "Clip test sill" })).toHaveCount(0);
});

// Issue 15, water: the routine-watering rule is stated once in µS/cm and shown in both ppm scales;
// the demo's rain water (about 15 ppm on a 0.5 meter) has no buffer, so its pH is not judged
// (common practice).
test("the water page states the rule in µS/cm with both ppm scales, and does not judge rain water's pH", async ({
  page,
}) => {
  await signIn(page, DEMO.carer);
  await page.goto("/sites/1/water");
  const rules = page.getByTestId("water-rules");
  await expect(rules).toContainText("over 200 µS/cm is not for routine watering");
  await expect(rules).toContainText("100 ppm on the 0.5 (NaCl) scale and 140 ppm on the 0.7 (442) scale");
  const rain = page.getByTestId("water-sources").locator("section", { hasText: "Rain water" });
  await expect(rain).toContainText("Good for routine watering");
  await expect(rain).toContainText("is not judged: water this low in minerals");
  await page.screenshot({ path: ".data/water-rules.png", fullPage: true });
});
