import { test, expect, signIn, DEMO } from "./fixtures";

// A logger's export: °F, naive local times, a BOM and CRLF line endings, and one bad row.
const CSV =
  "\uFEFFTimestamp,Temp (°F),RH (%)\r\n" +
  "2026-06-01 08:00:07,68.0,55\r\n" +
  "2026-06-01 08:05:07,68.9,56\r\n" +
  "2026-06-01 08:10:07,oops,56\r\n" +
  "2026-06-01 08:15:07,70.7,57\r\n";

test("CSV upload: preview as stored, skipped rows named, import twice adds nothing the second time", async ({
  page,
}) => {
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

// A logger's night across the end of British Summer Time on 27 October 2024 (clocks go back at
// 02:00 BST to 01:00 GMT, UK Summer Time Order): 01:00–01:59 is written twice. Long before the demo
// sensor was placed, so the preview warns and links to the placement on the sensor's page.
const BACKLOG =
  "time,temperature\n" +
  ["00:30", "01:00", "01:30", "01:00", "01:30", "02:00"].map((t) => `2024-10-27 ${t},12.5`).join("\n") +
  "\n";

test("CSV preview: says how a repeated hour was read and warns of rows before the sensor's placement", async ({
  page,
}) => {
  await signIn(page, DEMO.carer);
  await page.goto("/sites/1/import");
  await page
    .getByLabel("CSV file")
    .setInputFiles({ name: "backlog.csv", mimeType: "text/csv", buffer: Buffer.from(BACKLOG, "utf8") });
  await page.getByLabel("Readings from sensor").selectOption({ label: "Spare room sensor (in Spare room (heated))" });
  await page.getByRole("button", { name: "Preview" }).click();
  await expect(page.getByTestId("csv-dst")).toContainText(
    "4 rows in the repeated hour of 27 October 2024 were read in " +
      "file order: 2 rows as the first occurrence, UTC+01:00, then 2 " +
      "rows after the clock went back as the second, UTC+00:00.",
  );
  const outside = page.getByTestId("csv-outside");
  await expect(outside).toContainText("6 rows fall before this sensor's placement");
  await expect(outside.getByRole("link", { name: /Extend the sensor's placement/ })).toHaveAttribute(
    "href",
    /^\/sites\/1\/sensors\/\d+#placements$/,
  );
  await page.screenshot({ path: ".data/csv-preview-dst.png", fullPage: true });
});
