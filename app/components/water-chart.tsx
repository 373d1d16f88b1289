// The water page's chart: each source's conductivity over time against the routine-watering line,
// with a note on the TDS readings it cannot place (ppm without the meter's scale).
import { useMemo } from "react";
import { Chart, type ChartSpec } from "~/components/chart";
import { WATER_SOURCE_COLOURS } from "~/components/water-marks";
import { sourceName, type LoggedCheck } from "~/domain/water/logged-check";
import { ROUTINE_WATERING_MAX_EC } from "~/domain/water/verdict";

export function WaterChart({
  checks,
  sources,
  timeZone,
}: {
  checks: LoggedCheck[];
  /** The sources in the order of their first check; each keeps its colour. */
  sources: string[];
  timeZone: string;
}) {
  const chartData = useMemo(() => {
    const withTds = checks.filter((c) => c.ecExact != null);
    const t = [...new Set(withTds.map((c) => Math.floor(new Date(c.checkedOn).getTime() / 1000)))].sort(
      (a, b) => a - b,
    );
    const cols: Record<string, (number | null)[]> = { t };
    sources.forEach((s, i) => {
      const col: (number | null)[] = t.map(() => null);
      for (const c of withTds.filter((c) => c.source === s))
        col[t.indexOf(Math.floor(new Date(c.checkedOn).getTime() / 1000))] = Math.round(c.ecExact!);
      cols[`s${i}`] = col;
    });
    cols.limit = t.map(() => ROUTINE_WATERING_MAX_EC);
    return t.length ? cols : undefined;
  }, [checks, sources]);
  const unplotted = checks.filter((c) => c.ecExact == null && c.ppm != null).length;
  const spec = useMemo<ChartSpec>(
    () => ({
      title: "Dissolved solids over time (conductivity, µS/cm)",
      unit: "C",
      height: 220,
      calendarAxis: true,
      build: (d) => ({
        data: [d.t, ...sources.map((_s, i) => d[`s${i}`]), d.limit] as never,
        series: [
          ...sources.map((s, i) => ({
            label: sourceName(s),
            stroke: WATER_SOURCE_COLOURS[i % WATER_SOURCE_COLOURS.length],
            width: 2,
            spanGaps: true,
            points: { show: true, size: 6 },
            value: (_u: unknown, v: number | null) => (v == null ? "–" : `${v} µS/cm`),
          })),
          {
            label: `${ROUTINE_WATERING_MAX_EC} µS/cm rule of thumb`,
            stroke: "#4a5767",
            dash: [6, 4],
            width: 1,
            points: { show: false },
          },
        ],
        axes: [
          { stroke: "#4a5767", grid: { stroke: "#d4dcdb" } },
          { stroke: "#4a5767", grid: { stroke: "#d4dcdb" }, label: "µS/cm", size: 50 },
        ],
      }),
    }),
    [sources],
  );

  if (!chartData) return null;
  return (
    <section className="card">
      <Chart spec={spec} data={chartData} timeZone={timeZone} testId="water-chart" />
      {unplotted ? (
        <p className="mt-2 text-xs text-muted">
          {unplotted} TDS {unplotted === 1 ? "reading" : "readings"} without the meter's scale{" "}
          {unplotted === 1 ? "is" : "are"} in the table but not on the chart: a ppm figure stands for a different
          conductivity on a 0.5 and a 0.7 meter.
        </p>
      ) : null}
    </section>
  );
}
