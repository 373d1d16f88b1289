// The fit's flowering check: the cues a group needs to flower (cool autumn nights, a wide
// day–night difference), in their season, for long enough.
import {
  cyclicOrder,
  hemisphereMonths,
  median,
  monthKeys,
  round1,
  unknown,
  worstLevel,
  type Fact,
  type FitCheck,
  type CheckLevel,
} from "~/domain/fit/facts";
import type { SeasonProfile } from "~/domain/season/types";

/**
 * The best stretch of `weeks` weeks (within the cue months, when the group has them) in which
 * enough days meet the cool-period condition. Returns the count of qualifying days and their months.
 */
function bestCoolSpell(
  season: SeasonProfile,
  cond: (d: { low: number; high: number }) => boolean,
  inSeason: (month: number) => boolean,
  weeks: number,
): { best: number; months: number[] } {
  const days = season.days.filter((d) => d.low !== null && d.high !== null);
  if (days.length === 0) return { best: 0, months: [] };
  const first = days[0].dayNumber;
  const flags = new Uint8Array(days.at(-1)!.dayNumber - first + 1);
  const monthAt = new Uint8Array(flags.length);
  for (const d of days) {
    monthAt[d.dayNumber - first] = d.month;
    if (inSeason(d.month) && cond({ low: d.low!, high: d.high! })) flags[d.dayNumber - first] = 1;
  }
  const width = Math.min(weeks * 7, flags.length);
  let count = 0,
    best = 0,
    bestEnd = width - 1;
  for (let i = 0; i < flags.length; i++) {
    count += flags[i] - (i >= width ? flags[i - width] : 0);
    if (i >= width - 1 && count > best) {
      best = count;
      bestEnd = i;
    }
  }
  const months = new Set<number>();
  for (let i = Math.max(0, bestEnd - width + 1); i <= bestEnd; i++) if (flags[i]) months.add(monthAt[i]);
  return { best, months: cyclicOrder([...months]) };
}

const swingCache = new WeakMap<SeasonProfile, Map<number, { month: number; difC: number }[]>>();
/** Each month's typical (median) day–night difference, the day's high minus its low, once per season. */
function monthlySwings(season: SeasonProfile, minDays: number) {
  let byMin = swingCache.get(season);
  if (!byMin) swingCache.set(season, (byMin = new Map()));
  let out = byMin.get(minDays);
  if (!out) {
    const swings: number[][] = Array.from({ length: 13 }, () => []);
    for (const d of season.days) if (d.low !== null && d.high !== null) swings[d.month].push(d.high - d.low);
    out = [];
    for (let m = 1; m <= 12; m++)
      if (swings[m].length >= minDays) out.push({ month: m, difC: round1(median(swings[m])) });
    byMin.set(minDays, out);
  }
  return out;
}

/**
 * The flowering cue in its season (cool nights or cool days for some weeks, in the months the cue
 * counts) and the day–night difference as the day's high minus its low, month by month. Missing
 * them costs flowers, not the plant: care at worst.
 */
export const floweringNeeds: FitCheck = (profile, season, t) => {
  const days = season.days.filter((d) => d.low !== null && d.high !== null);
  const cool = profile.flowering.coolPeriod;
  const need = profile.flowering.difC;
  if (!cool && need === undefined) return { rule: "flowering", level: "good", facts: [{ kind: "cue-none" }] };
  if (days.length === 0) return unknown("flowering");
  const facts: Fact[] = [];
  const levels: CheckLevel[] = [];
  const months: number[] = [];
  if (cool) {
    const cond = (d: { low: number; high: number }) =>
      (cool.maxNightC === undefined || d.low <= cool.maxNightC) &&
      (cool.maxDayC === undefined || d.high <= cool.maxDayC);
    const cueMonths = cool.cueMonths ? hemisphereMonths(cool.cueMonths, season) : null;
    const inSeason = (m: number) => !cueMonths || cueMonths.includes(m);
    const needDays = Math.ceil(cool.weeks * 7 * t.coolSpellShare);
    const hit = bestCoolSpell(season, cond, inSeason, cool.weeks);
    const dryRest = cool.dryRest ?? false;
    if (hit.best >= needDays) {
      facts.push({
        kind: "cue-met",
        maxNightC: cool.maxNightC,
        maxDayC: cool.maxDayC,
        weeks: cool.weeks,
        months: hit.months,
        days: hit.best,
        dryRest,
      });
      levels.push("good");
      months.push(...hit.months);
    } else {
      // Where the cool spell comes out of season, the months it does come (half their days or more).
      const anyTime = cueMonths ? bestCoolSpell(season, cond, () => true, cool.weeks) : { best: 0, months: [] };
      const coolMonths: number[] = [];
      if (anyTime.best >= needDays) {
        for (let m = 1; m <= 12; m++) {
          const inMonth = days.filter((d) => d.month === m);
          if (
            inMonth.length &&
            inMonth.filter((d) => cond({ low: d.low!, high: d.high! })).length * 2 >= inMonth.length
          )
            coolMonths.push(m);
        }
      }
      facts.push({
        kind: "cue-missed",
        maxNightC: cool.maxNightC,
        maxDayC: cool.maxDayC,
        weeks: cool.weeks,
        bestDays: hit.best,
        cueMonths: cueMonths ? cyclicOrder(cueMonths) : [],
        outOfSeason: cyclicOrder(coolMonths),
        dryRest,
      });
      levels.push("care");
    }
  }
  if (need !== undefined) {
    const byMonth = monthlySwings(season, t.difMinDays);
    const meeting = byMonth.filter((x) => x.difC >= need - t.sensorMarginC);
    if (byMonth.length === 0) levels.push("unknown");
    else if (meeting.length > 0) {
      facts.push({ kind: "dif-met", needC: need, months: meeting });
      levels.push("good");
      months.push(...meeting.map((x) => x.month));
    } else {
      const best = byMonth.reduce((a, b) => (b.difC > a.difC ? b : a));
      facts.push({ kind: "dif-missed", needC: need, bestC: best.difC, bestMonth: best.month });
      levels.push("care");
    }
  }
  return {
    rule: "flowering",
    level: worstLevel(levels),
    facts,
    ...(months.length ? { months: monthKeys(months) } : {}),
  };
};
