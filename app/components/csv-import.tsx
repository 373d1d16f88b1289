// The import page's two answers: a file as it will be stored (a sample of rows in the site's time,
// the clock changes, rows at times the sensor was in no spot, rows to be skipped), and the counts
// of an import once it has run.
import type { CsvMapping } from "~/domain/ingest/csv";

export type Preview = {
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

/** `timeZone`: the site's, which the sample's times are shown in. */
export function ImportPreview({ preview, timeZone }: { preview: Preview; timeZone: string }) {
  return (
    <section className="card" data-testid="csv-preview">
      <h2 className="h2 mb-3">As they will be stored</h2>
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Preview of the file">
        <table className="table">
          <thead>
            <tr>
              <th>Line</th>
              <th>Time ({timeZone})</th>
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
  );
}

/** What an import stored, as the import page's action answers. */
export type Imported = {
  rows: number;
  stored: number;
  duplicates: number;
  conflicts: number;
  failed: number;
  outsideSpots: number;
  /** Where the database went away, if it did: the rows from that line on were not stored. */
  stopped: { line: number; reason: string } | null;
  /** How rows at daylight-saving changes were read, one sentence each. */
  dstChanges: string[];
  sensorPage: string;
};

/** `onAnother`: clears the form for the next file. */
export function ImportResult({ imported, onAnother }: { imported: Imported; onAnother: () => void }) {
  return (
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
          {imported.outsideSpots.toLocaleString("en")} of the file&apos;s readings are at times when the sensor was in
          no spot, so no page shows them.{" "}
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
          {imported.stopped.reason}). Everything before that line is kept. Import the same file again when the server is
          back: rows already stored are skipped, so only the rest is added.
        </p>
      ) : null}
      <button type="button" className="btn-quiet mt-3" onClick={onAnother}>
        Import another file
      </button>
    </section>
  );
}
