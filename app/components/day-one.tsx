// The day-one view of a new spot (issue 16, part 5): what can be known before a year of readings —
// where the spot's model stands and the date of the first firm answer, the likely verdicts, the
// first days against the outdoor weather, the site's outdoor climate and the direct sun by month.
// Words first; the month-by-month figures one fold down. Dates come formatted from the loader.
import type { DirectSunEstimate } from "~/domain/climate/sun";
import { SpotsAndSeasons } from "~/components/illustration";
import { formatDelta, formatTemp, type TempUnit } from "~/domain/units";
import { MONTH_NAMES, MONTH_SHORT } from "~/lib/date-words";

export type DayOneView = {
  measuredMonths: number;
  daysWithReadings: number;
  weather: "ready" | "not-fetched";
  climate: {
    years: number;
    firstYear: number;
    lastYear: number;
    months: {
      month: number;
      meanDailyLowC: number;
      meanDailyHighC: number;
      coldestLowC: number;
      warmestHighC: number;
    }[];
  } | null;
  versus: {
    days: number;
    from: string;
    to: string;
    nightAboveC: number | null;
    dayAboveC: number | null;
    nightSpotC: number | null;
    nightOutC: number | null;
    daySpotC: number | null;
    dayOutC: number | null;
  } | null;
  model:
    | { state: "fitted"; days: number; errorC: number | null; years: number; firmBy: string | null }
    | { state: "waiting"; expected: string | null }
    | { state: "no-weather" }
    | { state: "no-past-years" };
  /** Likely verdicts (resting on projected months), best first, with the basis of the first. */
  likely: { verdict: string; names: string[] }[];
  basis: string | null;
};

const LIKELY_LABEL: Record<string, string> = {
  "thrives here": "Likely to thrive",
  "possible with care": "Likely with care",
  "good for part of the year": "Likely for part of the year",
  "struggles here": "Likely to struggle",
};

function list(names: string[], max = 4) {
  const shown = names.slice(0, max).map((n) => n.split(" (")[0]);
  const rest = names.length - shown.length;
  return `${shown.join(", ")}${rest > 0 ? ` and ${rest} more` : ""}`;
}

/** "9.0 °C above" / "1.5 °C below" / "about the same as". */
function aboveWords(dc: number, unit: TempUnit) {
  if (Math.abs(dc) < 0.5) return "about level with";
  return `${formatDelta(Math.abs(dc), unit)} ${dc > 0 ? "above" : "below"}`;
}

export function DayOne({ view, sun, unit }: { view: DayOneView; sun: DirectSunEstimate; unit: TempUnit }) {
  const { model, climate, versus } = view;
  const sunny = sun.months?.filter((m) => m.getsDirectSun).map((m) => MONTH_SHORT[m.month - 1]) ?? [];
  const coldest = climate?.months.reduce((a, b) => (b.meanDailyLowC < a.meanDailyLowC ? b : a));
  const warmest = climate?.months.reduce((a, b) => (b.meanDailyHighC > a.meanDailyHighC ? b : a));
  return (
    <section id="day-one" className="card space-y-2.5 text-sm" aria-labelledby="day-one-heading" data-testid="day-one">
      <div className="flex items-end justify-between gap-4">
        <h3 id="day-one-heading" className="h2">
          What is known already
        </h3>
        <SpotsAndSeasons className="h-auto w-32 shrink-0 sm:w-44" />
      </div>

      <p className="text-base" data-testid="day-one-model">
        {view.daysWithReadings === 0 ? (
          <>
            No readings here yet. Once a sensor has been here about a week, Nichewise learns how this spot follows the
            outdoor weather and gives likely verdicts for every month.
          </>
        ) : model.state === "fitted" ? (
          <>
            From its latest {model.days} {model.days === 1 ? "day" : "days"} of readings beside the outdoor weather,
            Nichewise has learned how this spot follows it
            {model.errorC !== null
              ? ` (daily lows and highs off by about ${formatDelta(model.errorC, unit)} on days it was not fitted on)`
              : ""}{" "}
            and projects the months not yet measured through {model.years} past {model.years === 1 ? "year" : "years"}{" "}
            of weather.{" "}
            {model.firmBy ? (
              <>
                First firm answer: <strong data-testid="day-one-firm-by">{model.firmBy}</strong>, once every month has
                been measured.
              </>
            ) : null}
          </>
        ) : model.state === "waiting" ? (
          <>
            Likely verdicts for every month come{" "}
            {model.expected ? (
              <>
                by <strong data-testid="day-one-model-date">{model.expected}</strong>
              </>
            ) : (
              "after about a week"
            )}
            , once a few whole days of readings line up with the outdoor weather. A firm answer needs every month
            measured: about a year.
          </>
        ) : model.state === "no-weather" ? (
          <>
            Outdoor weather not fetched yet: projections of the months not yet measured follow once it is. A firm answer
            needs every month measured: about a year.
          </>
        ) : (
          <>
            The outdoor weather of past years is not stored yet, so the months not yet measured cannot be projected. A
            firm answer needs every month measured: about a year.
          </>
        )}
      </p>

      {view.likely.length > 0 ? (
        <div data-testid="day-one-likely">
          <ul className="space-y-0.5">
            {view.likely.map((l) => (
              <li key={l.verdict}>
                <span className="font-semibold">{LIKELY_LABEL[l.verdict] ?? `Likely ${l.verdict}`}:</span>{" "}
                {list(l.names)}
              </li>
            ))}
          </ul>
          {view.basis ? <p className="text-muted">{view.basis}.</p> : null}
        </div>
      ) : null}

      {versus && (versus.nightAboveC !== null || versus.dayAboveC !== null) ? (
        <p data-testid="day-one-versus">
          {versus.days === 1 ? "Its one day of readings" : `The last ${versus.days} days with readings`} ({versus.from}
          {versus.from !== versus.to ? `–${versus.to}` : ""}):{" "}
          {versus.nightAboveC !== null ? (
            <>
              nights here ran <strong>{aboveWords(versus.nightAboveC, unit)}</strong> outdoors (
              {formatTemp(versus.nightSpotC, unit)} against {formatTemp(versus.nightOutC, unit)})
            </>
          ) : null}
          {versus.nightAboveC !== null && versus.dayAboveC !== null ? ", " : ""}
          {versus.dayAboveC !== null ? (
            <>
              afternoons <strong>{aboveWords(versus.dayAboveC, unit)}</strong> ({formatTemp(versus.daySpotC, unit)}{" "}
              against {formatTemp(versus.dayOutC, unit)})
            </>
          ) : null}
          .
        </p>
      ) : null}

      <p data-testid="day-one-climate">
        {climate && coldest && warmest ? (
          <>
            Outdoors here ({climate.years} past {climate.years === 1 ? "year" : "years"}, {climate.firstYear}–
            {climate.lastYear}): nights average {formatTemp(coldest.meanDailyLowC, unit)} in{" "}
            {MONTH_NAMES[coldest.month - 1]}
            {coldest.coldestLowC < coldest.meanDailyLowC - 0.2
              ? ` (the coldest year ${formatTemp(coldest.coldestLowC, unit)})`
              : ""}
            , days {formatTemp(warmest.meanDailyHighC, unit)} in {MONTH_NAMES[warmest.month - 1]}.{" "}
          </>
        ) : view.weather === "not-fetched" ? (
          <>Outdoor weather not fetched yet. </>
        ) : null}
        {sun.months
          ? sunny.length === 12
            ? "Direct sun through the window every month."
            : sunny.length === 0
              ? "No direct sun through the window in any month."
              : `Direct sun through the window in ${sunny.length} months (${sunny.join(", ")}).`
          : null}
      </p>

      {climate || sun.months ? (
        <details className="fold" data-testid="day-one-months">
          <summary>Month by month: outdoors and direct sun</summary>
          <div
            className="-mx-5 overflow-x-auto px-5"
            tabIndex={0}
            role="region"
            aria-label="Outdoor climate and direct sun by month"
          >
            <table className="table mt-2 tabular-nums">
              <thead>
                <tr>
                  <th>Month</th>
                  {climate ? <th>Outdoor nights / days</th> : null}
                  {sun.months ? <th>Direct sun</th> : null}
                </tr>
              </thead>
              <tbody>
                {MONTH_SHORT.map((name, i) => {
                  const c = climate?.months.find((m) => m.month === i + 1);
                  const s = sun.months?.find((m) => m.month === i + 1);
                  return (
                    <tr key={name}>
                      <td>{name}</td>
                      {climate ? (
                        <td>
                          {c
                            ? `${formatTemp(c.meanDailyLowC, unit, 0)} / ${formatTemp(c.meanDailyHighC, unit, 0)}`
                            : "–"}
                        </td>
                      ) : null}
                      {sun.months ? <td>{s?.getsDirectSun ? `${Math.round(s.hours * 2) / 2} h` : "none"}</td> : null}
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </details>
      ) : null}

      <p className="text-xs text-muted" data-testid="day-one-caution">
        Projected months are estimates from past weather: a colder or warmer year than usual will differ, and each month
        measured replaces its projection.
      </p>
    </section>
  );
}
