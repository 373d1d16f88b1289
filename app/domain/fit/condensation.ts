// The fit's condensation check: hours within the condensation margin of the dew point, where
// water stands on leaves.
import { cyclicOrder, monthKeys, round1, unknown, type FitCheck } from "~/domain/fit/facts";
import { CONDENSATION_MARGIN_C } from "~/domain/season/thresholds";
import type { MonthOfYearProfile } from "~/domain/season/types";

/**
 * Time the air spent within CONDENSATION_MARGIN_C of its dew point (the season profile counts it as
 * time under the margin). A 2 K margin is about 88 % RH, so for a group whose own range reaches that
 * (Masdevallia, Nepenthes) damp air is expected and the advice is air movement, not a warning.
 */
export const condensation: FitCheck = (profile, season, t) => {
  const months = season.year.filter((m) => m.coverage.hoursObserved > 0);
  if (months.length === 0) return unknown("condensation");
  const total = round1(months.reduce((n, m) => n + m.condensationHours, 0));
  const share = (m: MonthOfYearProfile) => m.condensationHours / m.coverage.hoursObserved;
  const wet = months.filter((m) => share(m) >= t.condensationCareShare);
  if (wet.length === 0)
    return {
      rule: "condensation",
      level: "good",
      facts: [{ kind: "condensation-ok", hours: total, marginC: CONDENSATION_MARGIN_C }],
    };
  const worst = wet.reduce((a, b) => (share(b) > share(a) ? b : a));
  const expected = profile.humidityMax >= 88;
  return {
    rule: "condensation",
    level: expected ? "good" : "care",
    months: monthKeys(wet.map((m) => m.month)),
    facts: [
      {
        kind: "condensation-wet",
        hours: total,
        marginC: CONDENSATION_MARGIN_C,
        months: cyclicOrder(wet.map((m) => m.month)),
        worstMonth: worst.month,
        worstShare: Math.round(share(worst) * 100) / 100,
        expected,
      },
    ],
  };
};
