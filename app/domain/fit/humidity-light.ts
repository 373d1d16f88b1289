// The fit's humidity and light checks: the group's humidity band by its dry hours, and its light
// band by month.
import {
  cyclicOrder,
  hemisphereMonths,
  median,
  monthKeys,
  round1,
  unknown,
  type Fact,
  type FitCheck,
  type CheckLevel,
} from "~/domain/fit/facts";
import type { SeasonProfile } from "~/domain/season/types";

/** Each month's daily humidity minimums, sorted, once per season. */
const humidityCache = new WeakMap<SeasonProfile, { byMonth: number[][]; lowest: number; count: number }>();
function dailyHumidity(season: SeasonProfile) {
  let h = humidityCache.get(season);
  if (!h) {
    const byMonth: number[][] = Array.from({ length: 13 }, () => []);
    let lowest = Infinity,
      count = 0;
    for (const d of season.days) {
      if (d.rhLow === undefined || d.rhLow === null) continue;
      byMonth[d.month].push(d.rhLow);
      lowest = Math.min(lowest, d.rhLow);
      count++;
    }
    for (const list of byMonth) list.sort((a, b) => a - b);
    humidityCache.set(season, (h = { byMonth, lowest, count }));
  }
  return h;
}

/**
 * Humidity by its dry part of the day: each day's lowest reading against the group's minimum. A
 * month where that happens on a quarter of its days or more asks for care; the monthly mean would
 * hide a heated room's 30 % afternoons behind its 70 % nights. Dry air is fixable (a tray, grouping,
 * a humidifier), so never worse than care. Damp air: the monthly mean over the group's maximum.
 */
export const humidityBand: FitCheck = (profile, season, t) => {
  const { byMonth, lowest: lowestDaily, count } = dailyHumidity(season);
  const months = season.year.filter((m) => m.humidity.mean !== null);
  if (months.length === 0 && count === 0) return unknown("humidity");
  const facts: Fact[] = [];
  const dryMonths: number[] = [];
  const dryDayMins: number[] = [];
  let dryDays = 0,
    daysInDryMonths = 0;
  for (let m = 1; m <= 12; m++) {
    const mins = byMonth[m];
    if (mins.length === 0) continue;
    // Sorted ascending: the dry days are a prefix.
    let dry = 0;
    while (dry < mins.length && mins[dry] < profile.humidityMin) dry++;
    if (dry / mins.length >= t.dryDayShare) {
      dryMonths.push(m);
      dryDays += dry;
      daysInDryMonths += mins.length;
      for (let i = 0; i < dry; i++) dryDayMins.push(mins[i]);
    }
  }
  if (dryMonths.length > 0) {
    facts.push({
      kind: "humidity-dry",
      minPct: profile.humidityMin,
      dryDays,
      days: daysInDryMonths,
      months: cyclicOrder(dryMonths),
      typicalDailyMinPct: Math.round(median(dryDayMins)),
      lowestPct: Math.round(Math.min(...dryDayMins)),
    });
  }
  const damp = months.filter((m) => m.humidity.mean! > profile.humidityMax);
  if (damp.length > 0) {
    facts.push({
      kind: "humidity-damp",
      maxPct: profile.humidityMax,
      months: cyclicOrder(damp.map((m) => m.month)),
      meanPct: Math.round(Math.max(...damp.map((m) => m.humidity.mean!))),
    });
  }
  if (facts.length === 0) {
    const lowest = count ? lowestDaily : Math.min(...months.map((m) => m.humidity.lowest ?? m.humidity.mean!));
    return {
      rule: "humidity",
      level: "good",
      facts: [
        {
          kind: "humidity-ok",
          minPct: profile.humidityMin,
          maxPct: profile.humidityMax,
          lowestDailyMinPct: Math.round(lowest),
        },
      ],
    };
  }
  return { rule: "humidity", level: "care", months: monthKeys([...dryMonths, ...damp.map((m) => m.month)]), facts };
};

/**
 * Daily light integral month by month against the group's band: too dim and too bright. The yearly
 * mean would hide 19 mol in June and 3 in December. Low-light groups far over their maximum in
 * several months scorch (poor); the rest asks for care (a grow light, a sheer curtain). Light that
 * isn't measured is `unknown`, never fine.
 */
export const lightBand: FitCheck = (profile, season, t) => {
  const measured = season.year.filter((m) => m.light.meanDli !== null && m.light.daysWithLight > 0);
  if (measured.length === 0) return { rule: "light", level: "unknown", noData: true, facts: [] };
  const months = measured.map((m) => ({ month: m.month, dli: round1(m.light.meanDli!) }));
  // A lux chip that clips in direct sun reads low: a clipped month isn't called dim on its word.
  const clipped = measured.filter((m) => (m.light as { luxClipped?: number | boolean }).luxClipped).map((m) => m.month);
  const dim = months
    .filter((m) => m.dli < profile.dliMin * (1 - t.lightEdgeShare) && !clipped.includes(m.month))
    .map((m) => m.month);
  const bright = months.filter((m) => m.dli > profile.dliMax * (1 + t.lightEdgeShare)).map((m) => m.month);
  const scorch = months.filter((m) => m.dli > profile.dliMax * t.lightFarFactor).map((m) => m.month);
  // Winter is dim at any window at high latitudes; what rules a group out is a growing season far
  // too dim: most of April–September (October–March in the south) under dliMin ÷ lightFarFactor.
  const growing = hemisphereMonths([4, 5, 6, 7, 8, 9], season);
  const farDim = months
    .filter((m) => growing.includes(m.month) && !clipped.includes(m.month) && m.dli < profile.dliMin / t.lightFarFactor)
    .map((m) => m.month);
  const unmeasured = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].filter((m) => !measured.some((x) => x.month === m));
  const facts: Fact[] = [
    { kind: "light-months", minDli: profile.dliMin, maxDli: profile.dliMax, months, dim, bright, scorch, unmeasured },
  ];
  if (clipped.length) facts.push({ kind: "light-clipped", months: clipped });
  const level: CheckLevel =
    (profile.light === "low" && scorch.length >= t.scorchPoorMonths) || farDim.length >= 4
      ? "poor"
      : dim.length || bright.length
        ? "care"
        : unmeasured.length
          ? "unknown"
          : "good";
  return { rule: "light", level, months: monthKeys([...dim, ...bright]), facts };
};
