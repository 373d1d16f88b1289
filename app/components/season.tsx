import type { SlimProfile } from "~/.server/profiles";
import { formatDelta, formatTemp, type TempUnit } from "~/lib/units";

const VERDICT_STYLE: Record<string, { icon: string; cls: string }> = {
  "thrives here": { icon: "✓", cls: "text-good border-good/30 bg-good/5" },
  "possible with care": { icon: "◐", cls: "text-care border-care/30 bg-care/5" },
  "good for part of the year": { icon: "◑", cls: "text-care border-care/30 bg-care/5" },
  "struggles here": { icon: "✕", cls: "text-poor border-poor/30 bg-poor/5" },
  "not enough data yet": { icon: "…", cls: "text-muted border-line bg-paper" },
};

/** `likely`: the verdict rests partly or wholly on projected months (a dashed edge, "likely …"). */
export function VerdictBadge({ verdict, likely = false }: { verdict: string; likely?: boolean }) {
  const s = VERDICT_STYLE[verdict] ?? VERDICT_STYLE["not enough data yet"];
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-full border px-2.5 py-0.5 text-sm font-semibold ${s.cls}${likely ? " border-dashed" : ""}`}>
      <span aria-hidden="true">{s.icon}</span>
      {likely ? `likely ${verdict}` : verdict}
    </span>
  );
}

export type FitRow = {
  key: string;
  name: string;
  category: string | null;
  verdict: string;
  level?: string;
  reasons: { rule: string; level: string; message: string }[];
  okReasons: string[];
  missingMonths: string[];
  missingAdvice: string | null;
  /** Measured, or resting on projected months ("likely …", with the months and firm-by date in verdictText). */
  confidence?: "measured" | "projected" | "mixed";
  verdictText?: string;
};

export function FitList({ fits }: { fits: FitRow[]; unit: TempUnit; siteId: number }) {
  return (
    <ul className="divide-y divide-line" data-testid="fit-list">
      {fits.map((f) => (
        <li key={f.key} className="py-3">
          <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <span className="font-semibold">{f.name}</span>
            {f.category ? <span className="text-sm text-muted">{f.category} grower</span> : null}
            <span className="ml-auto">
              <VerdictBadge verdict={f.verdict} likely={!!f.confidence && f.confidence !== "measured" && f.verdict !== "not enough data yet"} />
            </span>
          </div>
          {f.confidence && f.confidence !== "measured" && f.verdictText?.startsWith("likely ") ? (
            <p className="mt-1 text-sm text-muted" data-testid="fit-basis">
              {f.verdictText.replace(/^likely [^—]+— /, "")}. Projected months are estimates from past weather.
            </p>
          ) : null}
          {f.reasons.length > 0 ? <p className="mt-1.5 text-sm">{f.reasons[0].message}</p> : null}
          {f.missingAdvice ? <p className="mt-1 text-sm text-muted">{f.missingAdvice}</p> : null}
          {f.reasons.length > 1 ? (
            <details className="mt-1 text-sm">
              <summary className="cursor-pointer text-muted">{f.reasons.length - 1} more {f.reasons.length === 2 ? "reason" : "reasons"}</summary>
              <ul className="mt-1 list-disc space-y-0.5 pl-5">
                {f.reasons.slice(1).map((r) => (
                  <li key={r.rule}>{r.message}</li>
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

export function SeasonTable({ months, seasons, unit }: { months: SlimProfile["year"]; seasons: SlimProfile["seasons"]; unit: TempUnit }) {
  const rows = [...months.map((m) => ({ ...m, label: m.name })), ...seasons.map((s) => ({ ...s, name: s.label }))];
  return (
    <div className="-mx-5 overflow-x-auto px-5">
      <table className="table min-w-[48rem]" data-testid="season-table">
        <thead>
          <tr>
            <th>Period</th>
            <th>Lowest</th>
            <th>5 %</th>
            <th>Mean daily low</th>
            <th>Mean daily high</th>
            <th>95 %</th>
            <th>Highest</th>
            <th>Day–night</th>
            <th>RH low–high</th>
            <th>Hours &lt; 10 °C</th>
            <th>Near dew point (h)</th>
            <th>DLI</th>
            <th>Days</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((m) => {
            const t = m.temperature;
            const ten = m.below.find((b) => b.thresholdC === 10);
            return (
              <tr key={m.key} className={m.coverage.enough ? "" : "text-muted"}>
                <td className="font-medium">
                  {m.label}
                  {m.coverage.enough ? "" : " *"}
                </td>
                <td>{formatTemp(t.lowest, unit)}</td>
                <td>{formatTemp(t.p05, unit)}</td>
                <td>{formatTemp(t.meanDailyLow, unit)}</td>
                <td>{formatTemp(t.meanDailyHigh, unit)}</td>
                <td>{formatTemp(t.p95, unit)}</td>
                <td>{formatTemp(t.highest, unit)}</td>
                <td>{formatDelta(t.meanDayNightDifference, unit)}</td>
                <td>
                  {m.humidity.lowest != null ? `${Math.round(m.humidity.lowest)}–${Math.round(m.humidity.highest ?? 0)} %` : "–"}
                </td>
                <td>{ten?.hours ?? "–"}</td>
                <td>{m.condensationHours}</td>
                <td>{m.light.meanDli != null ? m.light.meanDli.toFixed(1) : "–"}</td>
                <td>
                  {m.coverage.daysObserved}/{m.coverage.daysInPeriod}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-muted">
        * too few days with readings to judge (fewer than 20 in the month). Percentiles are of hourly mean temperatures. Day–night is the mean
        day temperature minus the mean night temperature, split at sunrise and sunset here; the fit rules read it as the day's high minus its low.
      </p>
    </div>
  );
}
