// The admin's ingest health page: a payload refused by ingest, sent with Debian's mosquitto_pub as a
// demo sensor, shows with its reason without a reload; everyone but the admin gets 404.
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { request as playwrightRequest } from "@playwright/test";
import { E2E } from "../../playwright.config";
import { test, expect, signIn, DEMO } from "./fixtures";

test("a payload rejected via mosquitto_pub shows with its reason", async ({ page }) => {
  await signIn(page, DEMO.admin);
  await page.goto("/admin");
  await expect(page.getByRole("heading", { name: "Ingest health" })).toBeVisible();
  await expect(page.getByText("Broker", { exact: true })).toBeVisible();
  await expect(page.getByText("Up", { exact: true })).toBeVisible();

  const [cred] = JSON.parse(readFileSync(`${E2E.dir}/demo-sensors.json`, "utf8")) as {
    sensorId: number;
    secret: string;
  }[];
  const marker = `not-json-${Date.now()}`;
  execFileSync("mosquitto_pub", [
    "-h",
    "127.0.0.1",
    "-p",
    String(E2E.mqttPort),
    "-q",
    "1",
    "-u",
    String(cred.sensorId),
    "-P",
    cred.secret,
    "-t",
    `nichewise/sensors/${cred.sensorId}/reading`,
    "-m",
    `{${marker}`,
  ]);
  // The page refreshes itself; no reload here.
  const example = page.getByTestId("rejections").getByRole("listitem").filter({ hasText: marker });
  await expect(example).toBeVisible({ timeout: 20_000 });
  await expect(example).toContainText("payload is not JSON");
  await expect(example).toContainText(`sensor ${cred.sensorId}`);
  await expect(example).toContainText("mqtt");
});

test("non-admins get 404 on the admin page and the mail sink", async ({ baseURL }) => {
  for (const who of [DEMO.owner, DEMO.carer, DEMO.mentor]) {
    const ctx = await playwrightRequest.newContext({ baseURL, maxRedirects: 0 });
    expect((await ctx.post("/sign-in", { form: who })).status()).toBe(302);
    expect((await ctx.get("/admin")).status(), who.email).toBe(404);
    expect((await ctx.get("/api/admin/mail")).status(), who.email).toBe(404);
    await ctx.dispose();
  }
});
