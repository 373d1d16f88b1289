// The spot page's year charts (daily lows and highs as a band, the dew-point margin) and Compare's
// monthly envelopes. Each has a readable table behind a details/summary for screen readers and for
// checking a number exactly. Values arrive in °C and are shown in the grower's unit.
import { useMemo } from "react";
import type uPlot from "uplot";
import { Chart, SITE_LOCALE, TEMP_COLOURS, useSeries, type ChartSpec } from "~/components/chart";
import { deltaToUnit, formatDelta, formatTemp, toUnit, type TempUnit } from "~/domain/units";
import { MONTH_SHORT } from "~/lib/date-words";

const AXIS = { stroke: "#4a5767", grid: { stroke: "#d4dcdb" }, ticks: { stroke: "#d4dcdb" } };
export { MONTH_SHORT as MONTHS_SHORT };
/** Dew-point margin under which glass and leaves are taken to be wet (the brief; same as the season profile). */
const WET_MARGIN_C = 2;

type Cols = Record<string, (number | null)[]>;
const conv = (xs: (number | null)[] | undefined, u: TempUnit) =>
  (xs ?? []).map((v) => (v == null ? null : toUnit(v, u)));
const fmt = (u: TempUnit) => (_s: uPlot, v: number | null) => (v == null ? "–" : `${v.toFixed(1)} °${u}`);

function yearBandSpec(unit: TempUnit): ChartSpec {
  return {
    title: "The last year, day by day: each day's low and high",
    unit,
    build: (d, u) => ({
      data: [d.t as number[], conv(d.high, u), conv(d.low, u)] as never,
      series: [
        { label: `Daily high °${u}`, stroke: TEMP_COLOURS.hot, width: 1.5, value: fmt(u) },
        { label: `Daily low °${u}`, stroke: TEMP_COLOURS.cold, width: 1.5, value: fmt(u) },
      ],
      bands: [{ series: [1, 2], fill: "rgba(224, 160, 74, 0.22)" }],
      axes: [AXIS, { ...AXIS, label: `°${u}`, size: 50 }],
    }),
  };
}

function marginSpec(unit: TempUnit): ChartSpec {
  return {
    title: "Dew-point margin: how close the air came to wetting glass and leaves (each day's smallest gap)",
    unit,
    build: (d, u) => ({
      data: [
        d.t as number[],
        (d.margin ?? []).map((v) => (v == null ? null : deltaToUnit(v, u))),
        (d.t as number[]).map(() => deltaToUnit(WET_MARGIN_C, u)),
      ] as never,
      series: [
        { label: `Smallest margin °${u}`, stroke: "#3b6ea8", width: 1.5, value: fmt(u) },
        {
          label: `Wet below ${formatDelta(WET_MARGIN_C, u, 0)}`,
          stroke: "#a53a2c",
          width: 1,
          dash: [5, 4],
          value: fmt(u),
        },
      ],
      axes: [AXIS, { ...AXIS, label: `°${u} above dew point`, size: 56 }],
    }),
  };
}

/**
 * The last 48 hours as two panels on one time axis: temperature above, humidity below, each with its
 * own scale, so no line is read against the other's axis.
 */
export function HoursCharts({ url, unit, timeZone }: { url: string; unit: TempUnit; timeZone: string }) {
  const series = useSeries(url);
  const tSpec = useMemo<ChartSpec>(
    () => ({
      title: "Last 48 hours: temperature",
      unit,
      height: 200,
      build: (d, u) => ({
        data: [d.t as number[], conv(d.temp, u)] as never,
        series: [{ label: `Temperature °${u}`, stroke: "#182338", width: 2, value: fmt(u) }],
        axes: [AXIS, { ...AXIS, label: `°${u}`, size: 50 }],
      }),
    }),
    [unit],
  );
  const hSpec = useMemo<ChartSpec>(
    () => ({
      title: "Last 48 hours: relative humidity",
      unit,
      height: 140,
      build: (d) => ({
        data: [d.t as number[], d.rh] as never,
        series: [
          {
            label: "Relative humidity %",
            stroke: "#2c6e63",
            width: 1.5,
            value: (_s: uPlot, v: number | null) => (v == null ? "–" : `${Math.round(v)} %`),
          },
        ],
        scales: { y: { range: [0, 100] } },
        axes: [AXIS, { ...AXIS, label: "% RH", size: 50 }],
      }),
    }),
    [unit],
  );
  return (
    <section className="card space-y-4">
      <Chart spec={tSpec} data={series.data} timeZone={timeZone} testId="chart-48h" />
      <Chart spec={hSpec} data={series.data} timeZone={timeZone} testId="chart-48h-rh" />
      {series.error ? <p className="error">Could not load the last 48 hours: {series.error}</p> : null}
    </section>
  );
}

/** Seven-day blocks from the first day of the year series, for the fallback tables. */
function weekly(d: Cols) {
  const t = d.t as number[];
  const out: { from: number; low: number | null; high: number | null; margin: number | null; wetDays: number }[] = [];
  for (let i = 0; i < t.length; i += 7) {
    const pick = (k: string) => (d[k] ?? []).slice(i, i + 7).filter((v): v is number => v != null);
    const lows = pick("low");
    const highs = pick("high");
    const margins = pick("margin");
    out.push({
      from: t[i],
      low: lows.length ? Math.min(...lows) : null,
      high: highs.length ? Math.max(...highs) : null,
      margin: margins.length ? Math.min(...margins) : null,
      wetDays: margins.filter((m) => m < WET_MARGIN_C).length,
    });
  }
  return out;
}

const dayLabel = (epochS: number, timeZone: string) =>
  new Intl.DateTimeFormat(SITE_LOCALE, { day: "numeric", month: "short", year: "numeric", timeZone }).format(
    new Date(epochS * 1000),
  );

type Week = ReturnType<typeof weekly>[number];

/** A chart's figures as a folded table, a row per week, for readers who cannot use the chart. */
function WeekByWeek({
  title,
  label,
  testId,
  columns,
  weeks,
  timeZone,
  cells,
}: {
  title: string;
  label: string;
  testId: string;
  columns: string[];
  weeks: Week[];
  timeZone: string;
  cells: (w: Week) => React.ReactNode[];
}) {
  return (
    <details className="text-sm">
      <summary className="cursor-pointer font-medium">{title}</summary>
      <div className="mt-2 max-h-96 overflow-auto" tabIndex={0} role="region" aria-label={label}>
        <table className="table" data-testid={testId}>
          <thead>
            <tr>
              <th>Week from</th>
              {columns.map((c) => (
                <th key={c}>{c}</th>
              ))}
            </tr>
          </thead>
          <tbody>
            {weeks.map((w) => (
              <tr key={w.from}>
                <td>{dayLabel(w.from, timeZone)}</td>
                {cells(w).map((c, i) => (
                  <td key={i}>{c}</td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </details>
  );
}

export function YearCharts({ url, unit, timeZone }: { url: string; unit: TempUnit; timeZone: string }) {
  const series = useSeries(url);
  const bandSpec = useMemo(() => yearBandSpec(unit), [unit]);
  const mSpec = useMemo(() => marginSpec(unit), [unit]);
  const weeks = useMemo(() => (series.data ? weekly(series.data) : []), [series.data]);
  const wetDays = useMemo(
    () => (series.data?.margin ?? []).filter((m) => m != null && m < WET_MARGIN_C).length,
    [series.data],
  );
  return (
    <>
      <section className="card space-y-3">
        <Chart spec={bandSpec} data={series.data} timeZone={timeZone} testId="chart-year" />
        <p className="text-xs text-muted">
          The shaded band runs from each day's lowest to its highest reading (local days).
        </p>
        {series.error ? <p className="error">Could not load the year: {series.error}</p> : null}
        <WeekByWeek
          title="The year as a table (week by week)"
          label="The year, week by week"
          testId="year-table"
          columns={["Lowest", "Highest"]}
          weeks={weeks}
          timeZone={timeZone}
          cells={(w) => [formatTemp(w.low, unit), formatTemp(w.high, unit)]}
        />
      </section>
      <section className="card space-y-3">
        <Chart spec={mSpec} data={series.data} timeZone={timeZone} testId="chart-margin" />
        <p className="text-sm text-muted">
          The margin is the air temperature minus its dew point. Under {formatDelta(WET_MARGIN_C, unit, 0)} cold glass
          and leaves can turn wet, which invites fungal spots and rot;{" "}
          {wetDays === 0
            ? "that never happened here in the last year."
            : `that happened on ${wetDays} ${wetDays === 1 ? "day" : "days"} here in the last year.`}
        </p>
        <WeekByWeek
          title="The dew-point margin as a table (week by week)"
          label="Dew-point margin, week by week"
          testId="margin-table"
          columns={["Smallest margin", `Days under ${formatDelta(WET_MARGIN_C, unit, 0)}`]}
          weeks={weeks}
          timeZone={timeZone}
          cells={(w) => [formatDelta(w.margin, unit), w.wetDays]}
        />
      </section>
    </>
  );
}

// On a narrow chart, label every second or third month so the labels don't run into each other.
const monthAxis = (labels: string[]): uPlot.Axis => ({
  ...AXIS,
  splits: () => labels.map((_, i) => i),
  values: (u, splits) => {
    const widest = Math.max(...labels.map((l) => l.length)) * 7 + 10;
    const every = Math.max(1, Math.ceil((labels.length * widest) / Math.max(1, u.width - 60)));
    return splits.map((v) => (v % every === 0 ? (labels[v] ?? "") : ""));
  },
});

/**
 * One colour per spot for overlays, from the Okabe–Ito palette (Okabe & Ito 2008, "Color Universal
 * Design"), which stays apart under the common colour-vision deficiencies: blue, vermillion, bluish
 * green, reddish purple, the four of its eight that keep 3:1 against the card for a line (WCAG 2.2
 * 1.4.11). Each spot also gets its own dash, so the key does not rest on colour alone.
 */
export const SPOT_COLOURS = ["#0072B2", "#D55E00", "#009E73", "#CC79A7"];
export const SPOT_DASH: (number[] | undefined)[] = [undefined, [6, 3], [2, 3], [10, 3, 2, 3]];

export function compareSpec(labels: string[], spots: { name: string }[], unit: TempUnit): ChartSpec {
  return {
    title: "Monthly envelopes side by side",
    unit,
    legend: false,
    xLabel: (x) => labels[x] ?? "",
    build: (d, u) => {
      const cols: (number | null)[][] = [];
      const series: uPlot.Series[] = [];
      const bands: uPlot.Band[] = [];
      spots.forEach((s, i) => {
        const colour = SPOT_COLOURS[i];
        const base = cols.length + 1;
        cols.push(conv(d[`highest${i}`], u), conv(d[`p95${i}`], u), conv(d[`p05${i}`], u), conv(d[`lowest${i}`], u));
        series.push(
          { label: `${s.name}: highest`, stroke: colour, width: 2, dash: SPOT_DASH[i], value: fmt(u) },
          { label: `${s.name}: 95 %`, stroke: "transparent", width: 0, value: fmt(u) },
          { label: `${s.name}: 5 %`, stroke: "transparent", width: 0, value: fmt(u) },
          { label: `${s.name}: lowest`, stroke: colour, width: 2, dash: SPOT_DASH[i], value: fmt(u) },
        );
        bands.push({ series: [base + 1, base + 2], fill: `${colour}2e` });
      });
      return {
        data: [d.x as number[], ...cols] as never,
        series,
        bands,
        scales: { x: { time: false, range: [-0.4, labels.length - 0.6] } },
        axes: [monthAxis(labels), { ...AXIS, label: `°${u}`, size: 50 }],
      };
    },
  };
}
