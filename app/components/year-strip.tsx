// The year strip: twelve months side by side, each a bar from the month's lowest to highest with the
// 5–95 % band and the mean daily low and high marked, and a plant's comfortable band laid over it.
import { coverageLabel, stripTicks } from "~/components/chart-scale";
import type { PeriodStats } from "~/domain/season/types";
import { toUnit, type TempUnit } from "~/domain/units";

export type StripMonth = {
  key: string;
  name: string;
  temperature: Pick<
    PeriodStats["temperature"],
    "lowest" | "highest" | "p05" | "p95" | "meanDailyLow" | "meanDailyHigh"
  >;
  coverage: { enough: boolean; daysObserved: number; hoursObserved?: number };
};

/** The scale's bands in °C, for the key under the strip. */
const SCALE: { below: number; colour: string }[] = [
  { below: 5, colour: "#3b6ea8" },
  { below: 12, colour: "#6aa3c8" },
  { below: 20, colour: "#cdbf9a" },
  { below: 27, colour: "#e0a04a" },
  { below: Infinity, colour: "#c4472f" },
];

// The same cool-to-warm scale as every chart (see --color-t-* in app.css).
export function tempColour(c: number) {
  if (c < 5) return "#3b6ea8";
  if (c < 12) return "#6aa3c8";
  if (c < 20) return "#cdbf9a";
  if (c < 27) return "#e0a04a";
  return "#c4472f";
}

export function YearStrip({
  months,
  band,
  unit,
  title,
}: {
  months: StripMonth[];
  band?: { low: number; high: number; label: string } | null;
  unit: TempUnit;
  title: string;
}) {
  const values = months
    .flatMap((m) => [m.temperature.lowest, m.temperature.highest])
    .filter((v): v is number => v != null);
  const lo = Math.floor(Math.min(band?.low ?? 99, ...values, 5) / 5) * 5 - 2;
  const hi = Math.ceil(Math.max(band?.high ?? -99, ...values, 25) / 5) * 5 + 2;
  const read = months.filter((m) => m.temperature.lowest != null && m.temperature.highest != null);
  const f = (c: number) => `${Math.round(toUnit(c, unit))} °${unit}`;
  const coldest = read.reduce<StripMonth | null>(
    (a, m) => (!a || m.temperature.lowest! < a.temperature.lowest! ? m : a),
    null,
  );
  const warmest = read.reduce<StripMonth | null>(
    (a, m) => (!a || m.temperature.highest! > a.temperature.highest! ? m : a),
    null,
  );
  const label =
    coldest && warmest
      ? `${title}. ${read.length} of 12 months read; lowest ` +
        `${f(coldest.temperature.lowest!)} in ${coldest.name}, highest ` +
        `${f(warmest.temperature.highest!)} in ${warmest.name}` +
        (band
          ? `; ${band.label} runs ${f(band.low)} to ${f(band.high)}, left ` +
            `in ` +
            `${read.filter((m) => m.temperature.lowest! < band.low || m.temperature.highest! > band.high).length} months.`
          : ".")
      : `${title}: no months read yet.`;
  // A wide strip for desktops and a taller one with larger type for a phone held next to the spot.
  return (
    <figure>
      <figcaption className="mb-2 text-sm font-medium">{title}</figcaption>
      <Strip
        {...{ months, band, unit, title: label, lo, hi }}
        W={720}
        H={260}
        font={11}
        className="hidden h-auto w-full sm:block"
        testId="year-strip"
      />
      <Strip
        {...{ months, band, unit, title: label, lo, hi }}
        W={360}
        H={300}
        font={12}
        className="h-auto w-full sm:hidden"
        testId="year-strip-compact"
      />
      <p className="mt-1 text-xs text-muted">
        Line: the month's lowest to highest. Bar: 5–95 % of hours, coloured by the temperature in its middle (a
        temperature, not a verdict). Black ticks: mean daily low and high.
        {band ? ` Shaded strip between dashed lines: ${band.label}. Red dot: the month leaves it.` : ""} Faded months
        have too few days of readings (what was read is shown under them).
      </p>
      <p className="mt-1 flex flex-wrap items-center gap-x-3 gap-y-1 text-xs text-muted" data-testid="year-strip-key">
        <span>Bar colours:</span>
        {SCALE.map((b, i) => {
          const from = i === 0 ? null : SCALE[i - 1].below;
          const u = (c: number) => Math.round(toUnit(c, unit));
          const text =
            from == null
              ? `under ${u(b.below)} °${unit}`
              : b.below === Infinity
                ? `${u(from)} °${unit} and up`
                : `${u(from)}–${u(b.below)} °${unit}`;
          return (
            <span key={b.colour} className="inline-flex items-center gap-1">
              <span className="inline-block h-2.5 w-4 rounded-sm" style={{ background: b.colour }} aria-hidden="true" />
              {text}
            </span>
          );
        })}
      </p>
    </figure>
  );
}

function Strip({
  months,
  band,
  unit,
  title,
  lo,
  hi,
  W,
  H,
  font,
  className,
  testId,
}: {
  months: StripMonth[];
  band?: { low: number; high: number; label: string } | null;
  unit: TempUnit;
  title: string;
  lo: number;
  hi: number;
  W: number;
  H: number;
  font: number;
  className: string;
  testId: string;
}) {
  const left = font * 3.5;
  const top = 12;
  const bottom = 36;
  const colW = (W - left - 8) / 12;
  const y = (c: number) => top + ((hi - c) / (hi - lo)) * (H - top - bottom);
  const ticks = stripTicks(lo, hi, unit);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className={className} role="img" aria-label={title} data-testid={testId}>
      {ticks.map((t) => (
        <g key={t.label}>
          <line x1={left} x2={W - 8} y1={y(t.c)} y2={y(t.c)} stroke="#d4dcdb" />
          <text x={left - 6} y={y(t.c) + 4} textAnchor="end" fontSize={font} fill="#4a5767" data-tick={t.label}>
            {t.label}°
          </text>
        </g>
      ))}
      {band ? (
        <g>
          <rect
            x={left}
            width={W - 8 - left}
            y={y(band.high)}
            height={Math.max(1, y(band.low) - y(band.high))}
            fill="#3f7a4a"
            opacity="0.13"
          />
          <line x1={left} x2={W - 8} y1={y(band.low)} y2={y(band.low)} stroke="#3f7a4a" strokeDasharray="4 3" />
          <line x1={left} x2={W - 8} y1={y(band.high)} y2={y(band.high)} stroke="#3f7a4a" strokeDasharray="4 3" />
        </g>
      ) : null}
      {months.map((m, i) => {
        const cx = left + colW * i + colW / 2;
        const t = m.temperature;
        const faint = !m.coverage.enough;
        return (
          <g key={m.key} opacity={faint ? 0.45 : 1}>
            {t.lowest != null && t.highest != null ? (
              <>
                <line x1={cx} x2={cx} y1={y(t.highest)} y2={y(t.lowest)} stroke="#4a5767" strokeWidth="2" />
                {t.p05 != null && t.p95 != null ? (
                  <rect
                    x={cx - colW * 0.22}
                    width={colW * 0.44}
                    y={y(t.p95)}
                    height={Math.max(2, y(t.p05) - y(t.p95))}
                    rx="4"
                    fill={tempColour((t.p05 + t.p95) / 2)}
                  />
                ) : null}
                {t.meanDailyLow != null ? (
                  <line
                    x1={cx - colW * 0.32}
                    x2={cx + colW * 0.32}
                    y1={y(t.meanDailyLow)}
                    y2={y(t.meanDailyLow)}
                    stroke="#182338"
                    strokeWidth="2"
                  />
                ) : null}
                {t.meanDailyHigh != null ? (
                  <line
                    x1={cx - colW * 0.32}
                    x2={cx + colW * 0.32}
                    y1={y(t.meanDailyHigh)}
                    y2={y(t.meanDailyHigh)}
                    stroke="#182338"
                    strokeWidth="2"
                  />
                ) : null}
                {band && (t.lowest < band.low || t.highest > band.high) ? (
                  <circle cx={cx} cy={t.lowest < band.low ? y(t.lowest) : y(t.highest)} r="4" fill="#a53a2c" />
                ) : null}
              </>
            ) : null}
            <text x={cx} y={H - bottom + 16} textAnchor="middle" fontSize={font} fill="#182338">
              {m.name.slice(0, 3)}
            </text>
            {faint ? (
              <text x={cx} y={H - bottom + 29} textAnchor="middle" fontSize={font - 2} fill="#4a5767">
                {coverageLabel(m.coverage)}
              </text>
            ) : null}
          </g>
        );
      })}
    </svg>
  );
}
