import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, useFetcher } from "react-router";
import { useState } from "react";
import { requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { auditCsvImport, csvSlot, importCsv, previewCsv } from "~/.server/ingest/csv-import";
import { CsvLimitError, isCsvFileError, readCsvHead, type CsvHead } from "~/.server/ingest/csv-file";
import { getSensor, listSensors } from "~/.server/sensors.server";
import { getSite } from "~/.server/sites";
import { CSV_MAX_BYTES, CSV_MAX_ROWS, guessMapping, type CsvMapping } from "~/domain/ingest/csv";
import { FieldError, FormErrors } from "~/components/field";
import { CSV_COLUMNS, csvImportSchema } from "~/forms/csv-import";
import { describeDstChange, formatInZone } from "~/lib/time";
import type { Route } from "./+types/import";

export const meta: Route.MetaFunction = () => [{ title: "Import CSV · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, WRITERS);
  return { site: await getSite(siteId), sensors: await listSensors(siteId) };
}

type Preview = {
  headers: string[];
  mapping: Omit<CsvMapping, "timeZone" | "dateFormat">;
  rows: { line: number; measuredAt: string; temperature: number | null; humidity: number | null; lux: number | null }[];
  failed: { line: number; reason: string }[];
  failedTotal: number;
  total: number;
  /** How rows at daylight-saving changes were read, one sentence each. */
  dstChanges: string[];
  outsideSpots: number;
  beforeFirstPlacement: number;
  earliestOutside: string | null;
  sensorPage: string;
};

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, WRITERS);
  const site = await getSite(siteId);
  // The body is already bounded by the web adapter (IMPORT_MAX_BYTES) before this runs.
  const submission = parseWithZod(await readForm(request), { schema: csvImportSchema });
  if (submission.status !== "success") return data({ result: submission.reply() }, { status: 400 });
  const form = submission.value;
  const sensor = await getSensor(siteId, form.sensorId);
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
  const release = csvSlot(String(user.id));
  if (!release)
    return data({ error: "Another preview or import is running; try again when it has finished." }, { status: 429 });
  try {
    const sensorPage = `/sites/${siteId}/sensors/${sensor.id}#placements`;
    if (form.intent === "import") {
      const result = await importCsv(bytes, mapping, sensor.id, { head });
      // An import stopped by the database going away still gets its answer, audited or not.
      await auditCsvImport({ siteId, actorId: user.id, sensorId: sensor.id, sensorName: sensor.name, result }).catch(
        (err) => console.error(`[csv] could not audit the import for sensor ${sensor.id}:`, err),
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

const zones = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : ["UTC"];

export default function Import({ loaderData }: Route.ComponentProps) {
  const { site, sensors } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const [key, setKey] = useState(0);
  const result = fetcher.data;
  const preview = result && "preview" in result ? result.preview : undefined;
  const imported = result && "imported" in result ? result.imported : undefined;
  const busy = fetcher.state !== "idle";
  const importing = busy && fetcher.formData?.get("intent") === "import";
  const [form, fields] = useForm({
    id: "csv-import",
    lastResult: result && "result" in result ? result.result : undefined,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: csvImportSchema }),
  });
  return (
    <div className="max-w-4xl space-y-6">
      <p className="text-muted">
        Many loggers export CSV. Up to {CSV_MAX_BYTES / 1024 / 1024} MB and {CSV_MAX_ROWS.toLocaleString("en")} rows per
        file; a file imported twice adds nothing the second time.
      </p>
      <fetcher.Form
        method="post"
        encType="multipart/form-data"
        className="card space-y-5"
        key={key}
        {...getFormProps(form)}
      >
        <div>
          <label className="label" htmlFor="file">
            CSV file
          </label>
          <input id="file" name="file" type="file" accept=".csv,.txt,text/csv" className="field" required />
          <FieldError meta={fields.file} />
        </div>
        <div className="grid gap-4 sm:grid-cols-2">
          <div>
            <label className="label" htmlFor="sensorId">
              Readings from sensor
            </label>
            <select id="sensorId" name="sensorId" className="field" required defaultValue={sensors[0]?.id}>
              {sensors.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name}
                  {s.spotName ? ` (in ${s.spotName})` : ""}
                </option>
              ))}
            </select>
            <p className="hint">Readings go to the spot the sensor was in at each timestamp.</p>
            <FieldError meta={fields.sensorId} />
          </div>
          <div>
            <label className="label" htmlFor="dateFormat">
              Dates are written
            </label>
            <select id="dateFormat" name="dateFormat" className="field" defaultValue="iso">
              <option value="iso">2026-03-01 18:30 (year first)</option>
              <option value="dmy">01/03/2026 18:30 (day first)</option>
              <option value="mdy">03/01/2026 6:30 PM (month first)</option>
              <option value="epoch">Seconds since 1970</option>
            </select>
            <FieldError meta={fields.dateFormat} />
          </div>
          <div>
            <label className="label" htmlFor="timeZone">
              Time zone of times without one
            </label>
            <select id="timeZone" name="timeZone" className="field" defaultValue={site.timeZone}>
              {zones.map((z) => (
                <option key={z} value={z}>
                  {z.replace(/_/g, " ")}
                </option>
              ))}
            </select>
            <FieldError meta={fields.timeZone} />
          </div>
          <div>
            <label className="label" htmlFor="unit">
              Temperatures in
            </label>
            <select id="unit" name="unit" className="field" defaultValue={preview?.mapping.unit ?? ""}>
              <option value="">Read it from the column name</option>
              <option value="C">°C</option>
              <option value="F">°F</option>
            </select>
            <FieldError meta={fields.unit} />
          </div>
        </div>
        {preview ? (
          <fieldset className="grid gap-4 sm:grid-cols-4">
            <legend className="label mb-2">Columns</legend>
            {CSV_COLUMNS.map((c) => (
              <div key={c}>
                <label className="text-sm text-muted" htmlFor={`col-${c}`}>
                  {c === "lux" ? "light (lux)" : c}
                </label>
                <select id={`col-${c}`} name={c} className="field" defaultValue={preview.mapping[c] ?? "none"}>
                  {c !== "timestamp" ? <option value="none">none</option> : null}
                  {preview.headers.map((h, i) => (
                    <option key={i} value={i}>
                      {h}
                    </option>
                  ))}
                </select>
                <FieldError meta={fields[c]} />
              </div>
            ))}
          </fieldset>
        ) : null}
        <FormErrors errors={form.errors} />
        {result && "error" in result ? (
          <p className="error" role="alert">
            {result.error}
          </p>
        ) : null}
        <div className="flex flex-wrap gap-3">
          <button className="btn-quiet" name="intent" value="preview" disabled={busy}>
            {preview ? "Update preview" : "Preview"}
          </button>
          {preview ? (
            <button className="btn" name="intent" value="import" disabled={busy}>
              {importing
                ? `Importing ${preview.total.toLocaleString("en")} rows…`
                : `Import ${preview.total.toLocaleString("en")} rows`}
            </button>
          ) : null}
        </div>
        {importing ? (
          <div
            className="h-1.5 w-full animate-pulse rounded-[0.2rem] bg-accent/40"
            role="progressbar"
            aria-label="Importing"
          />
        ) : null}
      </fetcher.Form>

      {preview ? (
        <section className="card" data-testid="csv-preview">
          <h2 className="h2 mb-3">As they will be stored</h2>
          <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Preview of the file">
            <table className="table">
              <thead>
                <tr>
                  <th>Line</th>
                  <th>Time ({site.timeZone})</th>
                  <th>°C</th>
                  <th>% RH</th>
                  <th>lux</th>
                </tr>
              </thead>
              <tbody>
                {preview.rows.map((r) => (
                  <tr key={r.line}>
                    <td>{r.line}</td>
                    <td>{r.measuredAt}</td>
                    <td>{r.temperature?.toFixed(2) ?? "–"}</td>
                    <td>{r.humidity?.toFixed(1) ?? "–"}</td>
                    <td>{r.lux ?? "–"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {preview.dstChanges.length > 0 ? (
            <div className="mt-4" data-testid="csv-dst">
              <h3 className="font-semibold">Clock changes</h3>
              <ul className="mt-1 list-disc pl-5 text-sm">
                {preview.dstChanges.map((d) => (
                  <li key={d}>{d}</li>
                ))}
              </ul>
            </div>
          ) : null}
          {preview.outsideSpots > 0 ? (
            <div className="mt-4" role="alert" data-testid="csv-outside">
              <p className="text-poor font-semibold">
                {preview.beforeFirstPlacement > 0
                  ? `${preview.beforeFirstPlacement.toLocaleString("en")} ` +
                    `${preview.beforeFirstPlacement === 1 ? "row falls" : "rows fall"}` +
                    ` before this sensor's placement`
                  : ""}
                {preview.beforeFirstPlacement > 0 && preview.outsideSpots > preview.beforeFirstPlacement ? "; " : ""}
                {preview.outsideSpots > preview.beforeFirstPlacement
                  ? `${(preview.outsideSpots - preview.beforeFirstPlacement).toLocaleString("en")} fall between its placements, in no spot`
                  : ""}
                .
              </p>
              <p className="text-sm">
                They would be stored but shown on no spot&apos;s pages
                {preview.earliestOutside ? ` (the earliest is ${preview.earliestOutside})` : ""}.{" "}
                <a className="link" href={preview.sensorPage}>
                  Extend the sensor&apos;s placement
                </a>{" "}
                to cover them before importing, or assign them there afterwards.
              </p>
            </div>
          ) : null}
          {preview.failed.length > 0 ? (
            <div className="mt-4">
              <h3 className="font-semibold text-poor">
                Rows that will be skipped ({preview.failedTotal.toLocaleString("en")}
                {preview.failedTotal > preview.failed.length ? `, the first ${preview.failed.length} shown` : ""})
              </h3>
              <ul className="mt-1 list-disc pl-5 text-sm" data-testid="csv-failures">
                {preview.failed.map((f) => (
                  <li key={f.line}>
                    Line {f.line}: {f.reason}
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
        </section>
      ) : null}

      {imported ? (
        <section className="card" data-testid="csv-result" role="status">
          <h2 className="h2">{imported.stopped ? "Import stopped part-way" : "Imported"}</h2>
          <p className="mt-2">
            {imported.stored.toLocaleString("en")} new readings stored of {imported.rows.toLocaleString("en")} rows
            {imported.duplicates > 0 ? `; ${imported.duplicates.toLocaleString("en")} were already stored` : ""}
            {imported.conflicts > 0
              ? `; ${imported.conflicts.toLocaleString("en")} had a different value already stored for their time, which was kept`
              : ""}
            {imported.failed > 0 ? `; ${imported.failed.toLocaleString("en")} rows skipped` : ""}.
          </p>
          {imported.outsideSpots > 0 ? (
            <p className="mt-2" role="alert" data-testid="csv-result-outside">
              {imported.outsideSpots.toLocaleString("en")} of the file&apos;s readings are at times when the sensor was
              in no spot, so no page shows them.{" "}
              <a className="link" href={imported.sensorPage}>
                Assign them to a spot on the sensor&apos;s page
              </a>
              .
            </p>
          ) : null}
          {imported.dstChanges.length > 0 ? (
            <ul className="mt-2 list-disc pl-5 text-sm">
              {imported.dstChanges.map((d) => (
                <li key={d}>{d}</li>
              ))}
            </ul>
          ) : null}
          {imported.stopped ? (
            <p className="error mt-2" role="alert" data-testid="csv-stopped">
              The rows from line {imported.stopped.line.toLocaleString("en")} on could not be stored (
              {imported.stopped.reason}). Everything before that line is kept. Import the same file again when the
              server is back: rows already stored are skipped, so only the rest is added.
            </p>
          ) : null}
          <button type="button" className="btn-quiet mt-3" onClick={() => setKey((k) => k + 1)}>
            Import another file
          </button>
        </section>
      ) : null}
    </div>
  );
}
