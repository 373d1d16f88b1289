// The direct-sun estimate for a spot's window facing, in words first and a month table second.
import type { DirectSunEstimate } from "~/domain/climate/sun";

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
const hours = (h: number) => `${Math.round(h * 2) / 2} h`;

export function DirectSun({ estimate, hasLightSensor }: { estimate: DirectSunEstimate; hasLightSensor: boolean }) {
  const sunny = estimate.months?.filter((m) => m.getsDirectSun).map((m) => MONTHS[m.month - 1]) ?? [];
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
      <p className="text-sm">{estimate.explanation}</p>
      {hasLightSensor ? (
        <p className="text-sm text-muted">This spot has a light sensor, so the fits judge its measured daily light; this estimate only explains it.</p>
      ) : null}
      {estimate.months ? (
        <details className="text-sm">
          <summary className="cursor-pointer font-medium">Month by month (the 21st of each month)</summary>
          <div className="-mx-5 overflow-x-auto px-5">
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
                    <td>{MONTHS[m.month - 1]}</td>
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
