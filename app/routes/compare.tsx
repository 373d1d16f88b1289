import { useMemo } from "react";
import { Form } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { slimMonths, slimProfile } from "~/domain/season/slim";
import { spotProfiles } from "~/.server/profiles";
import { getSite } from "~/.server/sites";
import { listSpots } from "~/.server/spots";
import { Chart } from "~/components/chart";
import { compareSpec, MONTHS_SHORT, SPOT_COLOURS, SPOT_DASH } from "~/components/spot-charts";
import { compareHeadlines, describeHeadline, seasonsOfYear, type SeasonFigures } from "~/domain/season/compare";
import { monthKey } from "~/domain/season/local-time";
import { toLocalInputValue, zonedToUtc } from "~/lib/time";
import { formatDelta, formatTemp, type TempUnit } from "~/domain/units";
import type { Route } from "./+types/compare";

export const meta: Route.MetaFunction = () => [{ title: "Compare spots · Nichewise" }];

const MONTH_RE = /^(\d{4})-(0[1-9]|1[0-2])$/;
const monthStart = (ym: string) => {
  const [, y, m] = MONTH_RE.exec(ym)!;
  return { y: Number(y), m: Number(m) };
};
const ym = (y: number, m: number) => {
  const d = new Date(Date.UTC(y, m - 1, 1)); // carries a month of 0 or 13 into the year
  return monthKey(d.getUTCFullYear(), d.getUTCMonth() + 1);
};
/** The instant the site's local month `m` (1–12, or beyond: carried into the year) of `y` begins. */
const localMonthStart = (y: number, m: number, timeZone: string) => zonedToUtc({ year: y, month: m, day: 1 }, timeZone);

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const site = await getSite(siteId);
  const spots = await listSpots(siteId);
  const q = new URL(request.url).searchParams;
  const now = new Date();
  // The twelve whole months before this one at the site, so every season has all its months.
  const here = monthStart(toLocalInputValue(now, site.timeZone).slice(0, 7));
  const defaultTo = ym(here.y, here.m - 1);
  const defaultFrom = ym(here.y, here.m - 12);
  let from = q.get("from") ?? defaultFrom;
  let to = q.get("to") ?? defaultTo;
  const problems: string[] = [];
  if (!MONTH_RE.test(from) || !MONTH_RE.test(to)) {
    problems.push("Choose the period as months (e.g. 2026-01).");
    from = defaultFrom;
    to = defaultTo;
  } else if (from > to) {
    problems.push("The period's first month is after its last; showing them the other way round.");
    [from, to] = [to, from];
  }
  const f = monthStart(from);
  const t = monthStart(to);
  if ((t.y - f.y) * 12 + (t.m - f.m) > 35)
    problems.push("Compare at most three years at a time; showing the last three years of the period.");
  // Months are the site's: a spot's rollups are kept by local hour.
  const toDate = new Date(Math.min(now.getTime(), localMonthStart(t.y, t.m + 1, site.timeZone).getTime()));
  const fromDate = new Date(
    Math.max(
      localMonthStart(f.y, f.m, site.timeZone).getTime(),
      localMonthStart(t.y - 3, t.m + 1, site.timeZone).getTime(),
    ),
  );

  const asked = q
    .getAll("spots")
    .map(Number)
    .filter((id) => spots.some((s) => s.id === id));
  const chosen = q.has("spots") ? [...new Set(asked)] : spots.slice(0, 2).map((s) => s.id);
  if (q.has("spots") && chosen.length < 2) problems.push("Choose at least two spots to compare.");
  if (chosen.length > 4) problems.push("Compare up to four spots at a time; showing the first four chosen.");
  const ids = chosen.slice(0, 4);
  const profiles =
    ids.length >= 2 ? await spotProfiles(site, ids, now, { range: { from: fromDate, to: toDate } }) : new Map();
  const compared = ids.map((id) => {
    const spot = spots.find((s) => s.id === id)!;
    const season = profiles.get(id);
    return season
      ? {
          id,
          name: spot.name,
          months: slimMonths(season),
          year: slimProfile(season).year,
          hemisphere: season.hemisphere,
        }
      : { id, name: spot.name, months: [], year: [], hemisphere: "northern" as const };
  });
  return {
    unit: user.temperatureUnit,
    spots: spots.map((s) => ({ id: s.id, name: s.name })),
    chosen: ids,
    from,
    to,
    problems,
    compared: profiles.size ? compared : [],
  };
}

const ROWS: { label: string; get: (f: SeasonFigures, u: TempUnit) => string; hint?: string }[] = [
  { label: "Lowest", get: (f, u) => formatTemp(f.lowest, u) },
  { label: "Mean daily low", get: (f, u) => formatTemp(f.meanDailyLow, u) },
  { label: "Mean daily high", get: (f, u) => formatTemp(f.meanDailyHigh, u) },
  { label: "Highest", get: (f, u) => formatTemp(f.highest, u) },
  { label: "Day–night difference", get: (f, u) => formatDelta(f.meanDayNightDifference, u) },
  { label: "Mean humidity", get: (f) => (f.meanHumidity == null ? "–" : `${Math.round(f.meanHumidity)} %`) },
  { label: "Hours under 10 °C (50 °F)", get: (f) => String(f.hoursBelow10) },
  { label: "Hours near the dew point", get: (f) => String(f.condensationHours) },
];

export default function Compare({ loaderData }: Route.ComponentProps) {
  const { unit, spots, chosen, compared, problems } = loaderData;
  const withSeasons = useMemo(
    () => compared.map((c) => ({ ...c, seasons: seasonsOfYear(c.year, c.hemisphere) })),
    [compared],
  );
  const headlines = useMemo(() => compareHeadlines(withSeasons), [withSeasons]);
  // All spots share the period, so their calendar months line up; take the longest list as the axis.
  const axisMonths = useMemo(
    () =>
      compared.reduce<{ key: string; year: number; month: number }[]>(
        (a, c) => (c.months.length > a.length ? c.months : a),
        [],
      ),
    [compared],
  );
  const spec = useMemo(
    () =>
      compareSpec(
        axisMonths.map((m, i) =>
          i === 0 || m.month === 1 ? `${MONTHS_SHORT[m.month - 1]} ${m.year}` : MONTHS_SHORT[m.month - 1],
        ),
        compared,
        unit,
      ),
    [axisMonths, compared, unit],
  );
  const data = useMemo(() => {
    const d: Record<string, (number | null)[]> = { x: axisMonths.map((_, i) => i) };
    compared.forEach((c, i) => {
      const byKey = new Map(c.months.map((m) => [m.key, m]));
      const col = (f: (m: (typeof c.months)[number]) => number | null) =>
        axisMonths.map((a) => (byKey.has(a.key) ? f(byKey.get(a.key)!) : null));
      d[`highest${i}`] = col((m) => m.temperature.highest);
      d[`p95${i}`] = col((m) => m.temperature.p95);
      d[`p05${i}`] = col((m) => m.temperature.p05);
      d[`lowest${i}`] = col((m) => m.temperature.lowest);
    });
    return d;
  }, [axisMonths, compared]);

  return (
    <div className="space-y-6">
      <div>
        <h2 className="h2">Compare spots</h2>
        <p className="text-sm text-muted">Choose two to four spots and a period to set their months side by side.</p>
      </div>
      <Form method="get" className="card space-y-4" aria-label="What to compare">
        <fieldset>
          <legend className="label">Spots (two to four)</legend>
          <div className="flex flex-wrap gap-x-5 gap-y-2">
            {spots.map((s) => (
              <label key={s.id} className="inline-flex items-center gap-2 text-sm">
                <input type="checkbox" name="spots" value={s.id} defaultChecked={chosen.includes(s.id)} />
                {s.name}
              </label>
            ))}
          </div>
        </fieldset>
        <div className="flex flex-wrap items-end gap-3">
          <div>
            <label className="label" htmlFor="from">
              From month
            </label>
            <input id="from" name="from" type="month" className="field" defaultValue={loaderData.from} />
          </div>
          <div>
            <label className="label" htmlFor="to">
              To month
            </label>
            <input id="to" name="to" type="month" className="field" defaultValue={loaderData.to} />
          </div>
          <button className="btn">Compare</button>
        </div>
        {problems.map((p) => (
          <p key={p} className="error" role="alert">
            {p}
          </p>
        ))}
      </Form>

      {compared.length >= 2 ? (
        <>
          <section className="card" data-testid="compare-headlines">
            <h3 className="h2 mb-2">In short</h3>
            {headlines.length === 0 ? (
              <p className="text-sm text-muted">
                Not enough months measured in every spot to say which is warmest or coolest in any season yet.
              </p>
            ) : (
              <ul className="list-disc space-y-1 pl-5">
                {headlines.map((h) => (
                  <li key={`${h.season}-${h.kind}`}>
                    {describeHeadline(
                      h,
                      (c) => formatTemp(c, unit),
                      (c) => formatDelta(c, unit),
                    )}
                  </li>
                ))}
              </ul>
            )}
          </section>

          <section className="card space-y-3">
            <ul className="flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label="Chart key" data-testid="compare-key">
              {compared.map((c, i) => (
                <li key={c.id} className="inline-flex items-center gap-2">
                  <svg width="28" height="12" aria-hidden="true">
                    <rect x="0" y="2" width="28" height="8" fill={SPOT_COLOURS[i]} opacity="0.18" />
                    <line
                      x1="0"
                      x2="28"
                      y1="6"
                      y2="6"
                      stroke={SPOT_COLOURS[i]}
                      strokeWidth="2"
                      strokeDasharray={SPOT_DASH[i]?.join(" ")}
                    />
                  </svg>
                  {c.name}
                </li>
              ))}
            </ul>
            <Chart spec={spec} data={data} testId="chart-compare" />
            <p className="text-xs text-muted">
              For each spot: lines at the month's lowest and highest, shaded between 5 % and 95 % of hourly mean
              temperatures. Each spot has its own colour and line pattern.
            </p>
            <details className="text-sm">
              <summary className="cursor-pointer font-medium">The envelopes as a table</summary>
              <div
                className="-mx-5 overflow-x-auto px-5"
                tabIndex={0}
                role="region"
                aria-label="The envelopes as a table"
              >
                <table className="table mt-2">
                  <thead>
                    <tr>
                      <th>Month</th>
                      {compared.map((c) => (
                        <th key={c.id}>{c.name}: lowest–highest</th>
                      ))}
                    </tr>
                  </thead>
                  <tbody>
                    {axisMonths.map((a, i) => (
                      <tr key={a.key}>
                        <td>
                          {MONTHS_SHORT[a.month - 1]} {a.year}
                        </td>
                        {compared.map((c, j) => (
                          <td key={c.id}>
                            {formatTemp(data[`lowest${j}`][i], unit)} – {formatTemp(data[`highest${j}`][i], unit)}
                          </td>
                        ))}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </details>
          </section>

          <section className="card">
            <h3 className="h2 mb-1">Season by season</h3>
            <p className="mb-3 text-sm text-muted">
              Each season's months in the chosen period taken together; months with fewer than 20 days of readings are
              left out (the count shows how many of its three months are in).
            </p>
            <div className="-mx-5 overflow-x-auto px-5" tabIndex={0} role="region" aria-label="Seasons side by side">
              <table className="table min-w-[36rem]" data-testid="compare-table">
                <thead>
                  <tr>
                    <th scope="col">Season</th>
                    {withSeasons.map((c) => (
                      <th key={c.id} scope="col">
                        {c.name}
                      </th>
                    ))}
                  </tr>
                </thead>
                {withSeasons[0].seasons.map((s, si) => (
                  <tbody key={s.season}>
                    <tr>
                      <th scope="rowgroup" colSpan={withSeasons.length + 1} className="bg-paper capitalize">
                        {s.season}
                      </th>
                    </tr>
                    <tr>
                      <td className="text-muted">Months measured</td>
                      {withSeasons.map((c) => (
                        <td key={c.id}>{c.seasons[si].monthsCovered} of 3</td>
                      ))}
                    </tr>
                    {ROWS.map((r) => (
                      <tr key={r.label}>
                        <td>{r.label}</td>
                        {withSeasons.map((c) => (
                          <td key={c.id}>{c.seasons[si].monthsCovered ? r.get(c.seasons[si], unit) : "–"}</td>
                        ))}
                      </tr>
                    ))}
                  </tbody>
                ))}
              </table>
            </div>
          </section>
        </>
      ) : null}
    </div>
  );
}
