import { test, expect, signIn, DEMO } from "./fixtures";

// A logger's export: °F, naive local times, a BOM and CRLF line endings, and one bad row.
const CSV =
  "\uFEFFTimestamp,Temp (°F),RH (%)\r\n" +
  "2026-06-01 08:00:07,68.0,55\r\n" +
  "2026-06-01 08:05:07,68.9,56\r\n" +
  "2026-06-01 08:10:07,oops,56\r\n" +
  "2026-06-01 08:15:07,70.7,57\r\n";

test("CSV upload: preview as stored, skipped rows named, import twice adds nothing the second time", async ({ page }) => {
  await signIn(page, DEMO.carer);
  await page.goto("/sites/1/import");
  const file = { name: "logger.csv", mimeType: "text/csv", buffer: Buffer.from(CSV, "utf8") };
  await page.getByLabel("CSV file").setInputFiles(file);
  await page.getByLabel("Readings from sensor").selectOption({ label: "Spare room sensor (in Spare room (heated))" });
  await page.getByRole("button", { name: "Preview" }).click();
  const preview = page.getByTestId("csv-preview");
  await expect(preview).toBeVisible();
  // 68 °F = 20 °C (the definition of the Fahrenheit scale: °C = (°F − 32) × 5/9).
  await expect(preview).toContainText("20.00");
  await expect(page.getByTestId("csv-failures")).toContainText("Line 4");
  // Rows are numbered by their line in the file: the row after the bad one is line 5, not 4.
  await expect(preview.locator("tbody tr td:first-child")).toHaveText(["2", "3", "5"]);
  await page.getByRole("button", { name: /Import 4 rows/ }).click();
  await expect(page.getByTestId("csv-result")).toContainText("3 new readings stored of 4 rows");
  await page.getByRole("button", { name: "Import another file" }).click();
  await page.getByLabel("CSV file").setInputFiles(file);
  await page.getByLabel("Readings from sensor").selectOption({ label: "Spare room sensor (in Spare room (heated))" });
  await page.getByRole("button", { name: "Preview" }).click();
  await page.getByRole("button", { name: /Import 4 rows/ }).click();
  await expect(page.getByTestId("csv-result")).toContainText("0 new readings stored of 4 rows");
});
