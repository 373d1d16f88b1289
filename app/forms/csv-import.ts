// The CSV import: a file, the sensor it came from, how its dates are written, and (after a
// preview) which column holds what. The buttons post `intent`: preview first, then import.
import { z } from "zod";
import { DATE_FORMATS } from "~/domain/ingest/csv";
import { TEMPERATURE_UNITS } from "~/domain/vocabulary";
import { rowId } from "~/forms/fields";
import { isTimeZone } from "~/forms/site";

export const CSV_COLUMNS = ["timestamp", "temperature", "humidity", "lux"] as const;

/** A column of the file by its index, or "none" (not in the file); absent means the guess from its header. */
const column = z
  .union([z.literal("none"), z.number().int().min(0).max(100_000)], { error: "Choose a column of the file" })
  .optional();

export const csvImportSchema = z.object({
  intent: z.enum(["preview", "import"], { error: "Unknown action" }).default("preview"),
  file: z.file({ error: "Choose a CSV file." }),
  sensorId: rowId("Choose the sensor the readings came from."),
  dateFormat: z.enum(DATE_FORMATS, { error: "Choose how the dates are written" }).default("iso"),
  // Not sent: the site's time zone.
  timeZone: z
    .string()
    .max(64, "Choose a time zone from the list.")
    .refine(isTimeZone, "Choose a time zone from the list.")
    .optional(),
  // Not sent: read from the column's name.
  unit: z.enum(TEMPERATURE_UNITS, { error: "Choose °C or °F" }).optional(),
  timestamp: column,
  temperature: column,
  humidity: column,
  lux: column,
});
