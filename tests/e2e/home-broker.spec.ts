// The site's home-broker page against a real Mosquitto on loopback (the grower's own broker): the
// owner connects, listens, and attaches a recognised Zigbee2MQTT topic to a sensor in two clicks
// (choose the sensor, Attach), and the next message is stored.
import AxeBuilder from "@axe-core/playwright";
import { connectAsync, type MqttClient } from "mqtt";
import { test, expect, signIn, DEMO } from "./fixtures";
import { startMosquitto, removeMosquittoDir, type Mosquitto } from "../integration/mosquitto";

let broker: Mosquitto;
let gateway: MqttClient;

test.beforeAll(async () => {
  broker = await startMosquitto({ users: { nichewise: "home-pass-1", gateway: "gw-pass-2" } });
  gateway = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
    username: "gateway",
    password: "gw-pass-2",
    clientId: "e2e-gateway",
  });
});

test.afterAll(async () => {
  await gateway?.endAsync(true).catch(() => {});
  await broker?.stop();
  if (broker) removeMosquittoDir(broker);
});

test("the owner connects a home broker, hears a Zigbee2MQTT sensor and attaches it in two clicks", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/broker");
  await expect(page.getByRole("heading", { name: "Sensors you already have" })).toBeVisible();
  // Nothing connected yet: the page starts with the one thing to do first, not with forms that cannot work yet.
  await expect(page.getByRole("heading", { name: "Connect your broker" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Listen for a minute" })).toHaveCount(0);

  await page.getByLabel("Address").fill(`mqtt://127.0.0.1:${broker.port}`);
  await page.getByLabel("User name").fill("nichewise");
  await page.getByLabel("Password", { exact: true }).fill("home-pass-1");
  await page.getByRole("button", { name: "Save and connect" }).click();
  await expect(page.getByText("Saved")).toBeVisible();
  // The password is never sent back to the page.
  await expect(page.getByLabel("Password", { exact: true })).toHaveValue("");
  expect(await page.content()).not.toContain("home-pass-1");
  await expect(async () => {
    await page.reload();
    await expect(page.getByTestId("bridge-state")).toContainText("Connected", { timeout: 1000 });
  }).toPass({ timeout: 20_000 });

  await page.getByLabel("Prefix").fill("zigbee2mqtt");
  await page.getByRole("button", { name: "Listen for a minute" }).click();
  await expect(page.getByTestId("heard")).toContainText("Listening");
  // The device reports while the page listens (Zigbee2MQTT's documented device JSON).
  const report = (t: number) =>
    gateway.publishAsync(
      "zigbee2mqtt/windowsill",
      JSON.stringify({ temperature: t, humidity: 60, battery: 87, linkquality: 112 }),
      { qos: 1 },
    );
  const row = page.getByRole("listitem", { name: "zigbee2mqtt/windowsill" });
  await expect(async () => {
    await report(21);
    await expect(row).toBeVisible({ timeout: 2500 });
  }).toPass({ timeout: 30_000 });
  await expect(row).toContainText("Zigbee2MQTT device JSON");
  await expect(row).toContainText("Would store: 21.0 °C · 60 % RH · battery 87 %");

  // Two clicks: the sensor, then Attach.
  await row.getByLabel("Sensor for zigbee2mqtt/windowsill").selectOption({ index: 1 });
  await row.getByRole("button", { name: "Attach zigbee2mqtt/windowsill" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Attached zigbee2mqtt/windowsill" })).toBeVisible();
  await expect(page.getByRole("heading", { name: "Attached topics" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Detach zigbee2mqtt/windowsill" })).toBeVisible();
  await expect(row).toContainText("Attached to");

  // A device with no sensor in Nichewise yet: attached to a new sensor made in the same step,
  // named after the device and placed in the chosen spot.
  const shelf = page.getByRole("listitem", { name: "zigbee2mqtt/orchid_shelf" });
  await expect(async () => {
    await gateway.publishAsync(
      "zigbee2mqtt/orchid_shelf",
      JSON.stringify({ temperature: 22.5, humidity: 64, battery: 90 }),
      { qos: 1 },
    );
    await expect(shelf).toBeVisible({ timeout: 2500 });
  }).toPass({ timeout: 30_000 });
  const choice = shelf.getByLabel("Sensor for zigbee2mqtt/orchid_shelf");
  const newInSpot = await choice.locator("option", { hasText: "New sensor “orchid shelf” in" }).first().textContent();
  await choice.selectOption({ label: newInSpot! });
  await shelf.getByRole("button", { name: "Attach zigbee2mqtt/orchid_shelf" }).click();
  await expect(page.getByRole("status").filter({ hasText: "to the new sensor “orchid shelf” in" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Detach zigbee2mqtt/orchid_shelf" })).toBeVisible();

  // With its lists filled: no serious or critical WCAG 2.2 AA violation (axe-core), and it fits a
  // 390 px phone (as tests/e2e/accessibility.spec.ts and phone-width.spec.ts check every page).
  for (const width of [390, 1280]) {
    await page.setViewportSize({ width, height: 900 });
    await page.reload();
    await expect(page.getByTestId("heard")).toBeVisible();
    const axe = await new AxeBuilder({ page })
      .withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"])
      .analyze();
    expect(
      axe.violations
        .filter((v) => v.impact === "serious" || v.impact === "critical")
        .map((v) => `${v.id}: ${v.nodes[0]?.target.join(" ")}`),
    ).toEqual([]);
    const [scroll, client] = await page.evaluate(() => [
      document.documentElement.scrollWidth,
      document.documentElement.clientWidth,
    ]);
    expect(scroll, `${width} px`).toBeLessThanOrEqual(client);
  }

  await expect(async () => {
    await report(21.5);
    await page.reload();
    await expect(page.getByTestId("bridge-state")).toContainText(/[1-9]\d* readings stored/, { timeout: 1000 });
  }).toPass({ timeout: 30_000 });
});
