// The site home's pieces: a spot as a niche card (its year in a small strip, its best groups, the
// plants standing there, what needs attention, and the latest reading as a detail), and the
// "where does what grow" matrix of spots × the groups the grower cares about.
import { Link } from "react-router";
import { tempColour } from "~/components/year-strip";
import { VerdictMark, VerdictWords, VERDICT_SHORT, type VerdictName } from "~/components/verdict-mark";
import { formatTemp, toUnit, type TempUnit } from "~/domain/units";
import { timeAgo } from "~/lib/date-words";
import { NoteIcon, PlantIcon, SensorIcon, SpotKindIcon, WatchIcon } from "~/components/icons";

export type CardMonth = {
  key: string;
  name: string;
  lowest: number | null;
  highest: number | null;
  meanDailyLow: number | null;
  meanDailyHigh: number | null;
  enough: boolean;
};

export type SpotCardData = {
  id: number;
  name: string;
  indoor: boolean;
  facing: string;
  capacity: number;
  days: number;
  year: CardMonth[];
  best: { key: string; name: string; verdict: string; reason: string | null }[];
  /** Groups nothing rules out yet, with months still too thin to judge. */
  pending: number;
  standing: { id: number; name: string; plant: string; pots: number; verdict: string | null }[];
  alerts: { id: number; kind: string; acknowledged: boolean }[];
  openNotes: number;
  latest: { hour: string; t: number | null; h: number | null } | null;
};

/** Twelve months, each a line from the lowest to the highest with the mean daily low and high as a bar. */
export function MiniYear({ months, unit, label }: { months: CardMonth[]; unit: TempUnit; label: string }) {
  const values = months.flatMap((m) => [m.lowest, m.highest]).filter((v): v is number => v != null);
  if (values.length === 0) return <p className="text-sm text-muted">No months measured yet.</p>;
  const lo = Math.floor(Math.min(...values, 5) / 5) * 5;
  const hi = Math.ceil(Math.max(...values, 25) / 5) * 5;
  const W = 240,
    H = 84,
    top = 4,
    bottom = 16,
    left = 22;
  const colW = (W - left) / 12;
  const y = (c: number) => top + ((hi - c) / (hi - lo)) * (H - top - bottom);
  const ticks = [lo, Math.round((lo + hi) / 10) * 5, hi];
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full" role="img" aria-label={label} data-testid="mini-year">
      {ticks.map((t) => (
        <g key={t}>
          <line x1={left} x2={W} y1={y(t)} y2={y(t)} stroke="var(--color-stone-line)" strokeWidth="0.6" />
          <text x={left - 3} y={y(t) + 3} textAnchor="end" fontSize="8" fill="var(--color-muted)">
            {Math.round(toUnit(t, unit))}°
          </text>
        </g>
      ))}
      {months.map((m, i) => {
        const cx = left + colW * i + colW / 2;
        return (
          <g key={m.key} opacity={m.enough ? 1 : 0.4}>
            {m.lowest != null && m.highest != null ? (
              <line x1={cx} x2={cx} y1={y(m.highest)} y2={y(m.lowest)} stroke="var(--color-ink)" strokeWidth="1" />
            ) : null}
            {m.meanDailyLow != null && m.meanDailyHigh != null ? (
              <rect
                x={cx - colW * 0.28}
                width={colW * 0.56}
                y={y(m.meanDailyHigh)}
                height={Math.max(2, y(m.meanDailyLow) - y(m.meanDailyHigh))}
                rx="2"
                fill={tempColour((m.meanDailyLow + m.meanDailyHigh) / 2)}
              />
            ) : null}
            <text x={cx} y={H - 4} textAnchor="middle" fontSize="8" fill="var(--color-ink)">
              {m.name.slice(0, 1)}
            </text>
          </g>
        );
      })}
    </svg>
  );
}

function extremes(months: CardMonth[]) {
  let low: { c: number; month: string } | null = null;
  let high: { c: number; month: string } | null = null;
  for (const m of months) {
    if (m.lowest != null && (!low || m.lowest < low.c)) low = { c: m.lowest, month: m.name };
    if (m.highest != null && (!high || m.highest > high.c)) high = { c: m.highest, month: m.name };
  }
  return { low, high };
}

export function SpotCard({
  spot,
  siteId,
  unit,
  now,
  periodText,
}: {
  spot: SpotCardData;
  siteId: number;
  unit: TempUnit;
  now: number;
  periodText: string;
}) {
  const href = `/sites/${siteId}/spots/${spot.id}`;
  const { low, high } = extremes(spot.year);
  const openAlerts = spot.alerts.filter((a) => !a.acknowledged).length;
  const hourAge = spot.latest ? now - new Date(spot.latest.hour).getTime() : 0;
  return (
    <article
      className={`niche flex h-full flex-col gap-3 ${openAlerts ? "border-v-struggles border-2" : ""}`}
      aria-labelledby={`spot-${spot.id}`}
      data-testid="spot-card"
    >
      <header className="flex items-start gap-3">
        <span className="mt-0.5 grid size-10 shrink-0 place-items-center rounded-t-full rounded-b-[0.2rem] bg-stone text-ink">
          <SpotKindIcon name={spot.name} indoor={spot.indoor} size={22} />
        </span>
        <div>
          <p className="eyebrow">
            {spot.indoor ? "indoors" : "outdoors"}
            {spot.facing !== "none" ? ` · window ${spot.facing}` : ""}
          </p>
          <h3 id={`spot-${spot.id}`} className="text-lg leading-snug font-semibold">
            <Link to={href} className="hover:underline">
              {spot.name}
            </Link>
          </h3>
        </div>
      </header>

      {spot.alerts.length || spot.openNotes ? (
        <p className="flex flex-wrap gap-x-3 text-sm">
          {spot.alerts.length ? (
            <Link
              to={`/sites/${siteId}/alerts`}
              className="inline-flex items-center gap-1 font-semibold text-v-struggles underline underline-offset-2"
              data-testid="card-alerts"
            >
              <WatchIcon size={16} />
              {spot.alerts.length === 1 ? "1 open alert" : `${spot.alerts.length} open alerts`}
              {openAlerts < spot.alerts.length ? ` (${spot.alerts.length - openAlerts} acknowledged)` : ""}
            </Link>
          ) : null}
          {spot.openNotes ? (
            <Link to={`${href}#notes`} className="link inline-flex items-center gap-1" data-testid="card-notes">
              <NoteIcon size={16} />
              {spot.openNotes === 1 ? "1 open note" : `${spot.openNotes} open notes`}
            </Link>
          ) : null}
        </p>
      ) : null}

      <div>
        <p className="eyebrow mb-1">Grows best here</p>
        {spot.best.length ? (
          <ul className="space-y-1" data-testid="card-best">
            {spot.best.map((b) => (
              <li key={b.key} className="text-sm">
                <span className="font-medium">{b.name}</span> — <VerdictWords verdict={b.verdict} />
              </li>
            ))}
          </ul>
        ) : spot.days === 0 ? (
          <p className="text-sm text-muted">Nothing judged yet: no readings. Place a sensor here.</p>
        ) : spot.pending ? (
          <p className="text-sm">
            <VerdictWords verdict="not enough data yet">Not judged yet</VerdictWords>: too few months measured; nothing
            rules out {spot.pending} {spot.pending === 1 ? "group" : "groups"} so far.
          </p>
        ) : (
          <p className="text-sm">
            <VerdictWords verdict="struggles here">Every group struggles here</VerdictWords>
          </p>
        )}
      </div>

      <figure>
        <MiniYear
          months={spot.year}
          unit={unit}
          label={`${spot.name}: lowest and highest temperature of each month, ${periodText}`}
        />
        <figcaption className="mt-1 text-xs text-muted">
          {low && high ? (
            <>
              Coldest {formatTemp(low.c, unit)} ({low.month}), warmest {formatTemp(high.c, unit)} ({high.month}).
            </>
          ) : (
            "The year fills in as readings arrive."
          )}
        </figcaption>
      </figure>

      <div>
        <p className="eyebrow mb-1 inline-flex items-center gap-1">
          <PlantIcon size={14} />
          Standing here
        </p>
        {spot.standing.length ? (
          <ul className="space-y-0.5 text-sm" data-testid="card-plants">
            {spot.standing.map((p) => (
              <li key={p.id}>
                {p.name}
                {p.pots > 1 ? ` ×${p.pots}` : ""}
                {p.verdict ? (
                  <>
                    {" "}
                    —{" "}
                    <VerdictWords verdict={p.verdict}>
                      {VERDICT_SHORT[p.verdict as VerdictName] ?? p.verdict}
                    </VerdictWords>
                  </>
                ) : null}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-sm text-muted">
            {spot.capacity > 0 ? `Empty, room for ${spot.capacity} pots.` : "No plants recorded."}
          </p>
        )}
      </div>

      <p className="mt-auto flex items-start gap-1.5 border-t border-stone-line pt-2 text-xs text-muted tabular-nums">
        <SensorIcon size={14} className="mt-px" />
        {spot.latest
          ? `Latest hour: ${spot.latest.t != null ? formatTemp(spot.latest.t, unit) : "–"}` +
            `${spot.latest.h != null ? `, ${Math.round(spot.latest.h)} % RH` : ""}${
              hourAge < 3_600_000
                ? " (so far this hour)"
                : ` · nothing heard for ${timeAgo(new Date(new Date(spot.latest.hour).getTime() + 3_600_000), now).replace(" ago", "")}`
            }`
          : "No readings yet."}
      </p>
    </article>
  );
}

export type MatrixData = {
  key: string;
  name: string;
  why: "wished" | "growing" | "fits";
  cells: { spotId: number; verdict: string; reason: string | null }[];
}[];

const WHY = { wished: "on your wishlist", growing: "growing here", fits: "does well somewhere" };

/** Spots across, groups down: each cell the verdict's mark, with the words for screen readers and on hover. */
export function WhereMatrix({
  rows,
  spots,
  siteId,
}: {
  rows: MatrixData;
  spots: { id: number; name: string }[];
  siteId: number;
}) {
  if (rows.length === 0 || spots.length === 0) return null;
  return (
    <>
      {spots.length > 4 ? (
        <p className="text-xs text-muted sm:hidden">Slide the table sideways for all {spots.length} spots.</p>
      ) : null}
      <div className="relative -mx-5 overflow-x-auto px-5">
        <table className="w-full border-collapse text-sm" data-testid="where-matrix">
          <caption className="sr-only">Where each plant group grows: a verdict for every spot</caption>
          <thead>
            <tr>
              <th scope="col" className="py-2 pr-2 text-left align-bottom font-medium text-muted">
                Group
              </th>
              {spots.map((s) => (
                <th
                  key={s.id}
                  scope="col"
                  className="min-w-[3rem] px-1 py-2 align-bottom text-xs leading-tight font-medium"
                >
                  <Link to={`/sites/${siteId}/spots/${s.id}`} className="hover:underline">
                    {s.name}
                  </Link>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.key} className="border-t border-stone-line">
                <th scope="row" className="max-w-[9rem] py-2 pr-2 text-left font-normal sm:max-w-none">
                  <Link to={`/sites/${siteId}/plants/${r.key}`} className="font-medium hover:underline">
                    {r.name}
                  </Link>
                  <span className="block text-xs text-muted">{WHY[r.why]}</span>
                </th>
                {r.cells.map((c) => (
                  <td
                    key={c.spotId}
                    className="px-1 py-2 text-center"
                    title={c.reason ? `${c.verdict}: ${c.reason}` : c.verdict}
                    data-verdict={c.verdict}
                  >
                    <VerdictMark verdict={c.verdict} size={20} />
                    <span className="sr-only">{c.verdict}</span>
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </>
  );
}
