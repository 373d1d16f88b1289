// The direct-sun estimate for a spot's window facing, in words first and a month table second.
import type { DirectSunEstimate } from "~/domain/climate/sun";
import { MONTH_SHORT } from "~/lib/date-words";

const hours = (h: number) => `${Math.round(h * 2) / 2} h`;

export function DirectSun({ estimate, hasLightSensor }: { estimate: DirectSunEstimate; hasLightSensor: boolean }) {
  const sunny = estimate.months?.filter((m) => m.getsDirectSun).map((m) => MONTH_SHORT[m.month - 1]) ?? [];
  return (
    <section className="card space-y-3" data-testid="direct-sun">
      <h3 className="h2">Direct sun through the window</h3>
      {estimate.months ? (
        <p className="font-medium">
          {sunny.length === 12
            ? "Some direct sun every month of the year."
            : sunny.length === 0
              ? "No direct sun in any month."
              : `Direct sun in ${sunny.length} months: ${sunny.join(", ")}.`}
        </p>
      ) : null}
      {estimate.months ? <SunBars months={estimate.months} /> : null}
      <p className="text-sm">{estimate.explanation}</p>
      {hasLightSensor ? (
        <p className="text-sm text-muted">
          This spot has a light sensor, so the fits judge its measured daily light; this estimate only explains it.
        </p>
      ) : null}
      {estimate.months ? (
        <details className="text-sm">
          <summary className="cursor-pointer font-medium">Month by month (the 21st of each month)</summary>
          <div className="-mx-5 overflow-x-auto px-5" tabIndex={0} role="region" aria-label="Direct sun month by month">
            <table className="table mt-2" data-testid="direct-sun-table">
              <thead>
                <tr>
                  <th>Month</th>
                  <th>Sun at noon</th>
                  <th>Direct sun</th>
                  <th>Morning / afternoon</th>
                  <th>Reaches in (per m of window)</th>
                </tr>
              </thead>
              <tbody>
                {estimate.months.map((m) => (
                  <tr key={m.month}>
                    <td>{MONTH_SHORT[m.month - 1]}</td>
                    <td>{Math.round(m.noonElevation)}° up</td>
                    <td>{m.getsDirectSun ? hours(m.hours) : "none"}</td>
                    <td>{m.getsDirectSun ? `${hours(m.morningHours)} / ${hours(m.afternoonHours)}` : "–"}</td>
                    <td>{m.depthPerMetre != null && m.getsDirectSun ? `${m.depthPerMetre.toFixed(1)} m` : "–"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </details>
      ) : null}
    </section>
  );
}

type SunMonth = NonNullable<DirectSunEstimate["months"]>[number];

/** Twelve bars, one per month: hours of direct sun through the window on the 21st. */
function SunBars({ months }: { months: SunMonth[] }) {
  const W = 360;
  const H = 150;
  const left = 28;
  const top = 10;
  const bottom = 22;
  const max = Math.max(2, Math.ceil(Math.max(...months.map((m) => (m.getsDirectSun ? m.hours : 0))) / 2) * 2);
  const colW = (W - left - 4) / 12;
  const y = (h: number) => top + (1 - h / max) * (H - top - bottom);
  const ticks = Array.from({ length: max / 2 + 1 }, (_, i) => i * 2).filter((t) => max <= 8 || t % 4 === 0);
  const label =
    "Hours of direct sun through the window on the 21st of each month: " +
    months.map((m) => `${MONTH_SHORT[m.month - 1]} ${m.getsDirectSun ? hours(m.hours) : "none"}`).join(", ") +
    ".";
  return (
    <figure>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="h-auto w-full max-w-xl"
        role="img"
        aria-label={label}
        data-testid="direct-sun-bars"
      >
        {ticks.map((t) => (
          <g key={t}>
            <line x1={left} x2={W - 4} y1={y(t)} y2={y(t)} stroke="#d4dcdb" />
            <text x={left - 4} y={y(t) + 3.5} textAnchor="end" fontSize="10" fill="#4a5767">
              {t} h
            </text>
          </g>
        ))}
        {months.map((m, i) => {
          const x = left + colW * i;
          const h = m.getsDirectSun ? m.hours : 0;
          return (
            <g key={m.month}>
              {h > 0 ? (
                <rect x={x + colW * 0.18} width={colW * 0.64} y={y(h)} height={y(0) - y(h)} rx="2" fill="#b7791f" />
              ) : null}
              {h === 0 ? (
                <line
                  x1={x + colW * 0.3}
                  x2={x + colW * 0.7}
                  y1={y(0) - 1}
                  y2={y(0) - 1}
                  stroke="#4a5767"
                  strokeWidth="2"
                />
              ) : null}
              <text x={x + colW / 2} y={H - 6} textAnchor="middle" fontSize="10" fill="#182338">
                {MONTH_SHORT[m.month - 1]}
              </text>
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-1 text-xs text-muted">
        Bars: hours of direct sun through the window on the 21st of each month; a dash means none.
      </figcaption>
    </figure>
  );
}
