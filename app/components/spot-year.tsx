// The spot page's year: the year strip of the judged period with a plant's comfortable range laid
// over it, the picker for another period, and the choice of that plant.
import { PeriodPicker } from "~/components/period-picker";
import { periodLabel, type PeriodView } from "~/domain/season/period";
import { YearStrip, type StripMonth } from "~/components/year-strip";
import type { TempUnit } from "~/domain/units";

/** The judged period as the spot page's loader gives it: `chosen` is "latest" or the last month. */
export type SpotPeriod = PeriodView & { chosen: string; months: string[]; problem: string | null };

export function SpotYear({
  months,
  unit,
  period,
  plant,
  plants,
}: {
  months: StripMonth[];
  unit: TempUnit;
  period: SpotPeriod;
  /** The plant laid over the strip. */
  plant: { key: string; name: string; minNightC: number; maxDayC: number } | null;
  plants: { key: string; name: string }[];
}) {
  return (
    <section id="year" className="card space-y-3">
      <YearStrip
        months={months}
        unit={unit}
        title={`${periodLabel(period)}, month by month`}
        band={plant ? { low: plant.minNightC, high: plant.maxDayC, label: `${plant.name}'s comfortable range` } : null}
      />
      <PeriodPicker
        chosen={period.chosen}
        months={period.months}
        keep={{ plant: plant?.key }}
        problem={period.problem}
      />
      <form method="get" className="flex flex-wrap items-center gap-2 text-sm">
        {period.chosen !== "latest" ? <input type="hidden" name="period" value={period.chosen} /> : null}
        <label htmlFor="plant">Lay a plant's range over it:</label>
        <select
          id="plant"
          name="plant"
          className="field w-auto max-w-full"
          defaultValue={plant?.key}
          onChange={(e) => e.currentTarget.form?.requestSubmit()}
        >
          {plants.map((p) => (
            <option key={p.key} value={p.key}>
              {p.name}
            </option>
          ))}
        </select>
        <noscript>
          <button className="btn-quiet">Show</button>
        </noscript>
      </form>
    </section>
  );
}
