import { readFileSync } from "node:fs";
import { E2E } from "../../playwright.config";
import type { Page } from "@playwright/test";
import { test, expect, signIn as signInFresh, DEMO } from "./fixtures";

// Switching people in one page: drop the previous session first.
async function signIn(page: Page, who: { email: string; password: string }) {
  await page.context().clearCookies();
  await signInFresh(page, who);
}

// The bench sensor's credentials, as the demo seed wrote them for the live simulator.
function benchSensor() {
  const creds = JSON.parse(readFileSync(`${E2E.dir}/demo-sensors.json`, "utf8")) as {
    sensorId: number;
    secret: string;
    spotIndex: number;
  }[];
  return creds.find((c) => c.spotIndex === 4)!;
}

test("a cold snap on the bench shows in the banner without a reload, and acknowledging records who did", async ({
  page,
  request,
}) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/alerts");
  const banner = page.getByRole("alert", { name: "Site alerts" });
  await expect(page.getByRole("heading", { name: "Open alerts" })).toBeVisible();
  // No cold snap yet (a forecast warning for the bench may be there: the weather fake's December can
  // forecast a frost night, which is not what this test is about).
  await expect(banner.getByText("Cold snap")).toHaveCount(0);

  // Fourteen minutes of 2 °C readings through the HTTP ingest, the last just now (seconds off the
  // backfill's five-minute grid so none is a duplicate): the default cold watch needs 10 minutes.
  const sensor = benchSensor();
  const now = Date.now();
  const readings = Array.from({ length: 15 }, (_, i) => ({
    time: new Date(now - (14 - i) * 60_000 - 17_000).toISOString(),
    temperature: 2,
    humidity: 90,
  }));
  const res = await request.post("/api/ingest", {
    headers: { Authorization: `Bearer ${sensor.sensorId}.${sensor.secret}` },
    data: { readings },
  });
  expect(res.status()).toBe(200);

  // The banner polls every 15 s: it appears on the open page without a reload.
  await expect(banner).toContainText("Cold snap", { timeout: 25_000 });
  await expect(banner).toContainText("Bench under the pear tree");
  await expect(banner).toContainText("lowest 2.0 °C");

  await signIn(page, DEMO.carer);
  await page.goto("/sites/1");
  await expect(banner).toContainText("Cold snap");
  await page.goto("/sites/1/alerts");
  const event = page.getByRole("listitem", { name: "Cold snap at Bench under the pear tree" }).first();
  await event.getByRole("button", { name: /acknowledge/ }).click();
  await expect(event).toContainText("Acknowledged by Jory Ashdown");

  await signIn(page, DEMO.mentor);
  await page.goto("/sites/1/alerts");
  await expect(page.getByRole("listitem", { name: "Cold snap at Bench under the pear tree" }).first()).toContainText(
    "Acknowledged by Jory Ashdown",
  );
  await expect(page.getByRole("button", { name: /acknowledge/ })).toHaveCount(0);
});

test("the owner sees the caution and the default watch with its reason; the carer may only pause", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/alerts");
  await page.getByRole("link", { name: "Bench under the pear tree" }).last().click();
  await expect(page.getByRole("heading", { name: "Alert watches" })).toBeVisible();
  await expect(page.getByRole("note")).toContainText("Alerts are a help, not a guarantee");
  const cold = page.getByRole("listitem", { name: "Cold snap watch" });
  await expect(cold).toContainText("Why this line:");
  await expect(cold).toContainText("Sent even during quiet hours");
  await expect(cold.getByRole("button", { name: "Save" })).toBeVisible();

  await signIn(page, DEMO.carer);
  await page.goto("/sites/1/alerts");
  await page.getByRole("link", { name: "Bench under the pear tree" }).last().click();
  const silent = page.getByRole("listitem", { name: "Silent sensor watch" });
  await expect(silent.getByRole("button", { name: "Save" })).toHaveCount(0);
  await silent.getByRole("button", { name: /Pause/ }).click();
  await expect(silent.getByTestId("watch-state")).toContainText("Paused");
  await silent.getByRole("button", { name: "Resume watching" }).click();
  await expect(silent.getByTestId("watch-state")).toContainText("Keeping watch");
});
