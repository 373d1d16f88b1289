// The import page's answer to a posted file: its head read within the limits, the columns (the
// grower's choice, else the guess from the headers), then either a preview of what would be stored
// and where, or the import itself with its audit row; one at a time per grower (csvSlot).
import { data } from "react-router";
import type { z } from "zod";
import { auditCsvImport, csvSlot, importCsv, previewCsv } from "~/.server/ingest/csv-import";
import { CsvLimitError, isCsvFileError, readCsvHead, type CsvHead } from "~/.server/ingest/csv-file";
import type { Preview } from "~/components/csv-import";
import { guessMapping, type CsvMapping } from "~/domain/ingest/csv";
import type { CSV_COLUMNS, csvImportSchema } from "~/forms/csv-import";
import { describeDstChange } from "~/lib/time";
import { formatInZone } from "~/lib/date-words";

/** `form`: the import form as its schema parsed it; `actorId`: the grower posting it. */
export async function previewOrImportCsv(
  form: z.infer<typeof csvImportSchema>,
  opts: { site: { id: number; timeZone: string }; sensor: { id: number; name: string }; actorId: number },
) {
  const { site, sensor, actorId } = opts;
  const siteId = site.id;
  const timeZone = form.timeZone ?? site.timeZone;
  const dateFormat = form.dateFormat;
  const file = form.file;
  if (file.size === 0) return data({ error: "Choose a CSV file." }, { status: 400 });
  const bytes = new Uint8Array(await file.arrayBuffer());
  let head: CsvHead;
  try {
    head = await readCsvHead(bytes);
  } catch (err) {
    if (err instanceof CsvLimitError) return data({ error: err.message }, { status: 413 });
    return data({ error: `The file could not be read as CSV: ${(err as Error).message}` }, { status: 400 });
  }
  if (head.headers.length === 0) return data({ error: "The file has no rows." }, { status: 400 });
  const guess = guessMapping(head.headers);
  // A column the file does not have (a preview of another file) falls back to the guess.
  const col = (v: (typeof form)[(typeof CSV_COLUMNS)[number]], fallback: number | null) =>
    v === undefined ? fallback : v === "none" ? null : v < head.headers.length ? v : fallback;
  const mapping: CsvMapping = {
    timestamp: col(form.timestamp, guess.timestamp) ?? guess.timestamp,
    temperature: col(form.temperature, guess.temperature),
    humidity: col(form.humidity, guess.humidity),
    lux: col(form.lux, guess.lux),
    unit: form.unit ?? guess.unit,
    dateFormat,
    timeZone,
  };
  // A million-row file takes seconds: one at a time per grower, two in the whole server.
  const release = csvSlot(String(actorId));
  if (!release)
    return data({ error: "Another preview or import is running; try again when it has finished." }, { status: 429 });
  try {
    const sensorPage = `/sites/${siteId}/sensors/${sensor.id}#placements`;
    if (form.intent === "import") {
      const result = await importCsv(bytes, mapping, sensor.id, { head });
      // An import stopped by the database going away still gets its answer, audited or not.
      await auditCsvImport({ siteId, actorId, sensorId: sensor.id, sensorName: sensor.name, result }).catch((err) =>
        console.error(`[csv] could not audit the import for sensor ${sensor.id}:`, err),
      );
      return data(
        { imported: { ...result, dstChanges: result.dstChanges.map(describeDstChange), sensorPage } },
        { status: result.stopped ? 503 : 200 },
      );
    }
    const p = await previewCsv(bytes, mapping, sensor.id, { head });
    if (p.rows === 0) return data({ error: "The file has no rows." }, { status: 400 });
    const preview: Preview = {
      headers: head.headers,
      mapping,
      rows: p.sample.map(({ line, reading: r }) => ({
        line,
        // With the offset, so the two readings of a repeated hour can be told apart.
        measuredAt: formatInZone(r.measuredAt, site.timeZone, { second: "2-digit", timeZoneName: "shortOffset" }),
        temperature: r.temperature,
        humidity: r.humidity,
        lux: r.lux,
      })),
      failed: p.firstFailures,
      failedTotal: p.failed,
      total: p.rows,
      dstChanges: p.dstChanges.map(describeDstChange),
      outsideSpots: p.outsideSpots,
      beforeFirstPlacement: p.beforeFirstPlacement,
      earliestOutside: p.earliestOutside ? formatInZone(p.earliestOutside, site.timeZone) : null,
      sensorPage,
    };
    return { preview };
  } catch (err) {
    if (!isCsvFileError(err)) throw err;
    return data({ error: `The file could not be read as CSV: ${err.message}` }, { status: 400 });
  } finally {
    release();
  }
}
