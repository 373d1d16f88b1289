// uPlot charts, drawn in the browser only, from columnar JSON fetched from the series API route.
// uPlot draws the lines; the legend is ours: each line's reading where the pointer is (or the latest),
// and the lowest and highest of the range shown, in the grower's unit. The canvas is named for screen
// readers by a sentence that sums the same numbers up.
import { useEffect, useMemo, useRef, useState } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { DEFAULT_FORMAT } from "~/domain/fit/describe";
import { timeTickLabels } from "~/components/chart-scale";

export const TEMP_COLOURS = { cold: "#3b6ea8", cool: "#6aa3c8", mild: "#cdbf9a", warm: "#e0a04a", hot: "#c4472f" };

/** The locale the product writes dates in; sites have no locale of their own yet. */
export const SITE_LOCALE = DEFAULT_FORMAT.locale ?? "en-GB";

export type ChartSpec = {
  title: string;
  height?: number;
  unit: "C" | "F";
  /** false when the page draws a labelled key of its own instead of Nichewise's legend. */
  legend?: boolean;
  /** How the pointer's x reads in the legend when x is not time (a month's name, say). */
  xLabel?: (x: number) => string;
  /** Ticks on whole months (or days over a short range) for scattered dates, such as water checks. */
  calendarAxis?: boolean;
  build: (
    data: Record<string, (number | null)[]>,
    unit: "C" | "F",
  ) => {
    data: uPlot.AlignedData;
    series: uPlot.Series[];
    axes?: uPlot.Axis[];
    bands?: uPlot.Band[];
    scales?: uPlot.Scales;
  };
};

/** What the series route sends beside the columns: the span asked for (epoch seconds) and how to write its dates. */
export type SeriesMeta = { from?: number; to?: number; locale?: string; timeZone?: string };
export type SeriesData = Record<string, (number | null)[]>;

export function useSeries(url: string) {
  const [state, setState] = useState<{ data?: SeriesData; error?: string }>({});
  useEffect(() => {
    let alive = true;
    fetch(url, { headers: { Accept: "application/json" } })
      .then((r) => (r.ok ? r.json() : Promise.reject(new Error(`HTTP ${r.status}`))))
      .then((d) => alive && setState({ data: d }))
      .catch((e: Error) => alive && setState({ error: e.message }));
    return () => {
      alive = false;
    };
  }, [url]);
  return state;
}

type LegendRow = {
  label: string;
  colour: string;
  dash?: number[];
  latest: number | null;
  low: number | null;
  high: number | null;
  format: (v: number | null) => string;
};

function legendRows(built: ReturnType<ChartSpec["build"]>): LegendRow[] {
  return built.series.flatMap((s, i) => {
    const stroke = typeof s.stroke === "string" ? s.stroke : "#182338";
    if (stroke === "transparent" || !s.label) return [];
    const values = (built.data[i + 1] ?? []) as (number | null | undefined)[];
    const present = values.filter((v): v is number => v != null && Number.isFinite(v));
    const latest = [...values].reverse().find((v): v is number => v != null) ?? null;
    const valueFn = typeof s.value === "function" ? s.value : null;
    const format = (v: number | null) =>
      v == null ? "–" : valueFn ? String(valueFn(undefined as never, v, i + 1, 0)) : v.toFixed(1);
    return [
      {
        label: String(s.label),
        colour: stroke,
        dash: s.dash,
        latest,
        low: present.length ? Math.min(...present) : null,
        high: present.length ? Math.max(...present) : null,
        format,
      },
    ];
  });
}

export function chartSummary(title: string, rows: LegendRow[]): string {
  const withData = rows.filter((r) => r.low != null);
  if (withData.length === 0) return `${title}: no readings in this range yet.`;
  return `${title}. ${withData.map((r) => `${r.label}: from ${r.format(r.low)} to ${r.format(r.high)}, last ${r.format(r.latest)}`).join("; ")}.`;
}

export function Chart({
  spec,
  data,
  testId,
  locale,
  timeZone,
}: {
  spec: ChartSpec;
  data?: SeriesData;
  testId?: string;
  /** The site's locale and time zone for the time axis; the series route sends both, these override. */
  locale?: string;
  timeZone?: string;
}) {
  const ref = useRef<HTMLDivElement>(null);
  const [cursor, setCursor] = useState<{ label: string; values: (number | null)[] } | null>(null);
  const meta = (data ?? {}) as unknown as SeriesMeta;
  const loc = locale ?? meta.locale ?? SITE_LOCALE;
  const tz = timeZone ?? meta.timeZone ?? "UTC";
  const built = useMemo(() => (data ? spec.build(data, spec.unit) : null), [data, spec]);
  const rows = useMemo(() => (built ? legendRows(built) : []), [built]);
  useEffect(() => {
    if (!built || !ref.current) return;
    let plot: uPlot | undefined;
    let observer: ResizeObserver | undefined;
    let cancelled = false;
    // uPlot, and for a calendar axis its zone rules (Temporal), load after the page has painted.
    Promise.all([import("uplot"), spec.calendarAxis ? import("~/components/chart-calendar") : null]).then(
      ([{ default: UPlot }, calendar]) => {
        if (cancelled || !ref.current) return;
        const width = ref.current.clientWidth || 600;
        const started = performance.now();
        const timeAxis = built.scales?.x?.time !== false;
        // A fixed span (48 hours, a year) from the route, so a few minutes of data still sit on the right scale.
        const xRange =
          timeAxis && typeof meta.from === "number" && typeof meta.to === "number"
            ? ([meta.from, meta.to] as [number, number])
            : undefined;
        const axisStyle = { stroke: "#4a5767", grid: { stroke: "#d4dcdb" }, ticks: { stroke: "#d4dcdb" } };
        const axes = built.axes ?? [axisStyle, { ...axisStyle, label: `°${spec.unit}`, size: 50 }];
        const el = ref.current;
        if (timeAxis && axes[0] && calendar) {
          let ticks: { splits: number[]; labels: string[] } = { splits: [], labels: [] };
          axes[0] = {
            ...axes[0],
            // About one label per 80 px, so "Jul 2026" never runs into "Aug" on a phone.
            splits: (u, _i, min, max) =>
              (ticks = calendar.calendarTicks(min, max, loc, tz, Math.max(2, Math.floor(u.width / 80)))).splits,
            values: (_u, splits) => {
              const labels = splits.map((s) => ticks.labels[ticks.splits.indexOf(s)] ?? "");
              el.dataset.xTicks = labels.join("|");
              return labels;
            },
          };
        } else if (timeAxis && axes[0])
          axes[0] = {
            ...axes[0],
            values: (_u, splits) => {
              const labels = timeTickLabels(splits, loc, tz);
              // The labels drawn, for tests and for anyone inspecting the page (the canvas has no text).
              el.dataset.xTicks = labels.join("|");
              return labels;
            },
          };
        const dayFormat = new Intl.DateTimeFormat(loc, {
          timeZone: tz,
          day: "numeric",
          month: "short",
          hour: "2-digit",
          minute: "2-digit",
          hourCycle: "h23",
        });
        plot = new UPlot(
          {
            width,
            height: spec.height ?? 240,
            tzDate: timeAxis ? (ts) => UPlot.tzDate(new Date(ts * 1000), tz) : undefined,
            series: [{}, ...built.series],
            bands: built.bands,
            scales: xRange ? { ...built.scales, x: { ...built.scales?.x, time: true, range: xRange } } : built.scales,
            axes,
            legend: { show: false },
            cursor: { drag: { x: false, y: false } },
            hooks: {
              setCursor: [
                (u) => {
                  const idx = u.cursor.idx;
                  if (idx == null) return setCursor(null);
                  const x = u.data[0][idx];
                  setCursor({
                    label: timeAxis ? dayFormat.format(new Date(x * 1000)) : (spec.xLabel?.(x) ?? String(x)),
                    values: built.series.map((_, i) => (u.data[i + 1]?.[idx] as number | null | undefined) ?? null),
                  });
                },
              ],
            },
          },
          built.data,
          ref.current,
        );
        ref.current.dataset.drawMs = (performance.now() - started).toFixed(1);
        observer = new ResizeObserver(() => {
          if (plot && ref.current) plot.setSize({ width: ref.current.clientWidth, height: spec.height ?? 240 });
        });
        observer.observe(ref.current);
      },
    );
    return () => {
      cancelled = true;
      observer?.disconnect();
      plot?.destroy();
    };
  }, [built, spec, loc, tz, meta.from, meta.to]);
  const summary = data ? chartSummary(spec.title, rows) : `${spec.title}: loading.`;
  const showLegend = spec.legend ?? true;
  return (
    <figure data-testid={testId}>
      <figcaption className="mb-2 text-sm font-medium">{spec.title}</figcaption>
      <div ref={ref} role="img" aria-label={summary} className="w-full min-h-[120px]" />
      {showLegend && rows.length ? (
        <dl className="mt-2 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2" data-testid="chart-legend">
          {rows.map((r) => {
            const i = built!.series.findIndex((s) => s.label === r.label);
            const here = cursor ? cursor.values[i] : r.latest;
            return (
              <div key={r.label} className="flex flex-wrap items-baseline gap-x-2">
                <dt className="flex items-baseline gap-1.5">
                  <svg width="22" height="8" aria-hidden="true" className="self-center">
                    <line
                      x1="1"
                      x2="21"
                      y1="4"
                      y2="4"
                      stroke={r.colour}
                      strokeWidth="3"
                      strokeDasharray={r.dash?.join(" ")}
                    />
                  </svg>
                  <span>{r.label}</span>
                </dt>
                {r.low === r.high ? (
                  // A reference line (the wet margin, say): one value, nothing to range over.
                  <dd className="tabular-nums">at {r.format(r.low)}</dd>
                ) : (
                  <>
                    <dd className="font-semibold tabular-nums">
                      {r.format(here)}
                      <span className="ml-1 text-xs font-normal text-muted">
                        {cursor ? `at ${cursor.label}` : "latest"}
                      </span>
                    </dd>
                    <dd className="w-full pl-7 text-xs text-muted tabular-nums sm:w-auto sm:pl-0">
                      {r.format(r.low)} to {r.format(r.high)} in the span shown
                    </dd>
                  </>
                )}
              </div>
            );
          })}
        </dl>
      ) : null}
    </figure>
  );
}
