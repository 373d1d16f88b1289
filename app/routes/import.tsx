import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, useFetcher } from "react-router";
import { useState } from "react";
import { requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { previewOrImportCsv } from "~/.server/ingest/csv-upload";
import { getSensor, listSensors } from "~/.server/sensors.server";
import { getSite } from "~/.server/sites";
import { CSV_MAX_BYTES, CSV_MAX_ROWS } from "~/domain/ingest/csv";
import { ImportPreview, ImportResult } from "~/components/csv-import";
import { FieldError, FormErrors } from "~/components/field";
import { CSV_COLUMNS, csvImportSchema } from "~/forms/csv-import";
import type { Route } from "./+types/import";

export const meta: Route.MetaFunction = () => [{ title: "Import CSV · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, WRITERS);
  return { site: await getSite(siteId), sensors: await listSensors(siteId) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, WRITERS);
  const site = await getSite(siteId);
  // The body is already bounded by the web adapter (IMPORT_MAX_BYTES) before this runs.
  const submission = parseWithZod(await readForm(request), { schema: csvImportSchema });
  if (submission.status !== "success") return data({ result: submission.reply() }, { status: 400 });
  const sensor = await getSensor(siteId, submission.value.sensorId);
  return previewOrImportCsv(submission.value, { site, sensor, actorId: user.id });
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

      {preview ? <ImportPreview preview={preview} timeZone={site.timeZone} /> : null}

      {imported ? <ImportResult imported={imported} onAnother={() => setKey((k) => k + 1)} /> : null}
    </div>
  );
}
