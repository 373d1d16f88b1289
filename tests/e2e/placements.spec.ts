// Where a sensor was when, as a grower sees it: a new sensor's placement covers the readings it
// stored before it was added, readings outside every spot are shown with a way to put them in one,
// and the verdict pages say which twelve months they judge.
import type { Page } from "@playwright/test";
import { test, expect, signIn, DEMO } from "./fixtures";

const DAY = 86_400_000;

async function addSensor(page: Page, name: string, since: "From its first reading" | "From now") {
  await page.goto("/sites/1/sensors/new");
  await page.getByLabel("Name").fill(name);
  await page.getByLabel("Place it in").selectOption({ label: "Spare room (heated)" });
  await page.getByLabel(since).check();
  await page.getByRole("button", { name: "Add sensor" }).click();
  const secret = (await page.getByTestId("secret").textContent())!.trim();
  const id = Number(/sensors\/(\d+)/.exec(page.url())![1]);
  return { id, secret };
}

/** Two readings from three days ago, as a sensor's offline buffer sends them. */
async function sendBuffer(page: Page, sensor: { id: number; secret: string }) {
  const at = Date.now() - 3 * DAY;
  const res = await page.request.post("/api/ingest", {
    headers: { Authorization: `Bearer ${sensor.id}.${sensor.secret}` },
    data: {
      readings: [0, 1].map((k) => ({
        time: new Date(at + k * 600_000).toISOString(),
        temperature: 17.5,
        humidity: 55,
      })),
    },
  });
  expect(res.ok()).toBe(true);
}

async function deleteSensor(page: Page, name: string) {
  await page.getByLabel(`Type “${name}” to delete it and its readings`).fill(name);
  await page.getByRole("button", { name: "Delete sensor" }).click();
  await expect(page.getByRole("link", { name: "Add a sensor" })).toBeVisible();
}

test("a new sensor placed 'from its first reading' files its buffered readings in the spot", async ({ page }) => {
  await signIn(page, DEMO.owner);
  const sensor = await addSensor(page, "Buffer test A", "From its first reading");
  await sendBuffer(page, sensor);
  await page.goto(`/sites/1/sensors/${sensor.id}#placements`);
  await expect(page.locator("#placements")).toContainText("its first reading → now");
  await expect(page.getByTestId("unplaced")).toHaveCount(0);
  await deleteSensor(page, "Buffer test A");
});

test("readings outside every spot are shown on the sensor page and put into a spot", async ({ page }) => {
  await signIn(page, DEMO.owner);
  const sensor = await addSensor(page, "Buffer test B", "From now");
  await sendBuffer(page, sensor);
  await page.goto(`/sites/1/sensors/${sensor.id}#placements`);
  await expect(page.getByTestId("unplaced")).toContainText("2 readings are in no spot");
  await page.getByLabel("They were in").selectOption({ label: "Spare room (heated)" });
  await page.getByRole("button", { name: "Put them there" }).click();
  await expect(page.getByTestId("unplaced")).toHaveCount(0);
  await expect(page.getByTestId("placement-history")).toContainText("its first reading → now");
  await deleteSensor(page, "Buffer test B");
});

test("the spot page says which twelve months it judges, and the picker changes them", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1");
  await page
    .getByRole("link", { name: /Spare room/ })
    .first()
    .click();
  await expect(page.getByTestId("judged-period")).toContainText("today");
  const picker = page.getByLabel("Judge on:");
  const option = picker.locator("option").nth(7); // the twelve months to six months ago
  const [value, label] = [
    await option.getAttribute("value"),
    (await option.textContent())!.replace("the 12 months to ", ""),
  ];
  await picker.selectOption(value!);
  await expect(page).toHaveURL(new RegExp(`period=${value}`));
  await expect(page.getByTestId("judged-period")).toContainText(`– ${label}`);
  await expect(page.getByTestId("judged-period")).not.toContainText("today");
});
