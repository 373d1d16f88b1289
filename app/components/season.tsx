import type { SlimProfile } from "~/domain/season/slim";
import { formatDelta, formatTemp, type TempUnit } from "~/domain/units";
import { VerdictWords } from "~/components/verdict-mark";
import { MonthStrip } from "~/components/month-strip";

/**
 * A verdict as words first with Nichewise's niche mark after it (docs/design.md), no pill. `likely`:
 * it rests partly or wholly on projected months, and says so.
 */
export function VerdictBadge({ verdict, likely = false }: { verdict: string; likely?: boolean }) {
  return <VerdictWords verdict={verdict}>{likely ? `likely ${verdict}` : verdict}</VerdictWords>;
}

export type FitRow = {
  key: string;
  name: string;
  category: string | null;
  verdict: string;
  level?: string;
  /** `strip`: the reason's twelve months (fit/month-strip.ts), where it names them. */
  reasons: { rule: string; level: string; message: string; strip?: string | null }[];
  okReasons: string[];
  missingMonths: string[];
  missingAdvice: string | null;
  /** Measured, or resting on projected months ("likely …", with the months and firm-by date in verdictText). */
  confidence?: "measured" | "projected" | "mixed";
  verdictText?: string;
};

export function FitList({
  fits,
  testId = "fit-list",
}: {
  fits: FitRow[];
  unit: TempUnit;
  siteId: number;
  testId?: string;
}) {
  return (
    <ul className="divide-y divide-line" data-testid={testId}>
      {fits.map((f) => (
        <li key={f.key} className="py-3">
          <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <span className="font-semibold">{f.name}</span>
            {f.category ? <span className="text-sm text-muted">{f.category} grower</span> : null}
            <span className="ml-auto">
              <VerdictBadge
                verdict={f.verdict}
                likely={!!f.confidence && f.confidence !== "measured" && f.verdict !== "not enough data yet"}
              />
            </span>
          </div>
          {f.confidence && f.confidence !== "measured" && f.verdictText?.startsWith("likely ") ? (
            <p className="mt-1 text-sm text-muted" data-testid="fit-basis">
              {f.verdictText.replace(/^likely [^—]+— /, "")}. Projected months are estimates from past weather.
            </p>
          ) : null}
          {f.reasons.length > 0 ? (
            <div className="mt-1.5 text-sm">
              <p>{f.reasons[0].message}</p>
              {f.reasons[0].strip ? <MonthStrip rule={f.reasons[0].rule} code={f.reasons[0].strip} /> : null}
            </div>
          ) : null}
          {f.missingAdvice ? <p className="mt-1 text-sm text-muted">{f.missingAdvice}</p> : null}
          {f.reasons.length > 1 ? (
            <details className="mt-1 text-sm">
              <summary className="cursor-pointer text-muted">
                {f.reasons.length - 1} more {f.reasons.length === 2 ? "reason" : "reasons"}
              </summary>
              <ul className="mt-1 list-disc space-y-0.5 pl-5">
                {f.reasons.slice(1).map((r) => (
                  <li key={r.rule}>
                    {r.message}
                    {r.strip ? <MonthStrip rule={r.rule} code={r.strip} /> : null}
                  </li>
                ))}
              </ul>
            </details>
          ) : null}
          {f.okReasons.length > 0 ? (
            <details className="mt-1 text-sm text-muted">
              <summary className="cursor-pointer">What suits it here</summary>
              <ul className="list-disc pl-5">
                {f.okReasons.map((m) => (
                  <li key={m}>{m}</li>
                ))}
              </ul>
            </details>
          ) : null}
        </li>
      ))}
    </ul>
  );
}

export function SeasonTable({
  months,
  seasons,
  unit,
}: {
  months: SlimProfile["year"];
  seasons: SlimProfile["seasons"];
  unit: TempUnit;
}) {
  const rows = [...months.map((m) => ({ ...m, label: m.name })), ...seasons.map((s) => ({ ...s, name: s.label }))];
  type Row = (typeof rows)[number];
  const columns: { label: string; cell: (m: Row) => string | number }[] = [
    { label: "Lowest", cell: (m) => formatTemp(m.temperature.lowest, unit) },
    { label: "5 %", cell: (m) => formatTemp(m.temperature.p05, unit) },
    { label: "Mean daily low", cell: (m) => formatTemp(m.temperature.meanDailyLow, unit) },
    { label: "Mean daily high", cell: (m) => formatTemp(m.temperature.meanDailyHigh, unit) },
    { label: "95 %", cell: (m) => formatTemp(m.temperature.p95, unit) },
    { label: "Highest", cell: (m) => formatTemp(m.temperature.highest, unit) },
    { label: "Day–night", cell: (m) => formatDelta(m.temperature.meanDayNightDifference, unit) },
    {
      label: "RH low–high",
      cell: (m) =>
        m.humidity.lowest != null ? `${Math.round(m.humidity.lowest)}–${Math.round(m.humidity.highest ?? 0)} %` : "–",
    },
    { label: "Hours < 10 °C", cell: (m) => m.below.find((b) => b.thresholdC === 10)?.hours ?? "–" },
    { label: "Near dew point (h)", cell: (m) => m.condensationHours },
    { label: "DLI", cell: (m) => (m.light.meanDli != null ? m.light.meanDli.toFixed(1) : "–") },
    {
      label: "Days",
      cell: (m) =>
        m.coverage.daysObserved === 0 && m.coverage.hoursObserved > 0
          ? `${Math.round(m.coverage.hoursObserved)} h of ${m.coverage.daysInPeriod} d`
          : `${m.coverage.daysObserved} of ${m.coverage.daysInPeriod}`,
    },
  ];
  // Under `sm` each row is a card of label–value pairs (the .stack-table class), so a phone reads it without scrolling sideways.
  return (
    <div className="sm:-mx-5 sm:overflow-x-auto sm:px-5" tabIndex={0} role="region" aria-label="Season table">
      <table className="table stack-table sm:min-w-[48rem]" data-testid="season-table">
        <thead>
          <tr>
            <th>Period</th>
            {columns.map((c) => (
              <th key={c.label}>{c.label}</th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((m) => (
            <tr key={m.key} className={m.coverage.enough ? "" : "text-muted"}>
              <th scope="row" className="font-medium text-ink">
                {m.label}
                {m.coverage.enough ? "" : " *"}
              </th>
              {columns.map((c) => (
                <td key={c.label} data-label={c.label}>
                  {c.cell(m)}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-muted">
        * too few days with readings to judge (fewer than 20 in the month). Percentiles are of hourly mean temperatures.
        Day–night is the mean day temperature minus the mean night temperature, split at sunrise and sunset here; the
        fit rules read it as the day's high minus its low.
      </p>
    </div>
  );
}
