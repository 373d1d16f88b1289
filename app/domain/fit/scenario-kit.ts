// Test support only: the pieces of the spot-scenario tables (fit/scenarios*.test.ts): synthetic
// hourly years (51.5° N, UTC) with named features, each with the verdict an experienced grower would
// give and the source of that judgement beside it.
import { expect, it } from "vitest";
import { describeReason } from "~/domain/fit/describe";
import type { CheckResult } from "~/domain/fit/facts";
import { type HourPatch, type MonthSpec } from "~/domain/fit/season-fixture";
import { fitPlant, type FitContext, type Verdict } from "~/domain/fit/verdict";
import { plantByKey } from "~/domain/plants/library";
import type { SeasonProfile } from "~/domain/season/types";

// DLI from a lux level held through the sun-up hours (sunlight factor 54): at 51.5° N, 10 klux
// gives about 5.6 mol in March and 9.9 in June.
export const steady =
  (night: number, day: number, extra: Partial<MonthSpec> = {}) =>
  () => ({ night, day, rh: 60, dpMargin: 8, ...extra });
export const byMonth = (f: (m: number) => Partial<MonthSpec> & { night: number; day: number }) => (m: number) => ({
  rh: 60,
  dpMargin: 8,
  ...f(m),
});
export const dip = (month: number, dayOfMonth: number, hour: number, t: number): HourPatch => ({
  month,
  dayOfMonth,
  hour,
  value: { t },
});
export const summer = (m: number) => m >= 5 && m <= 9;
export const east = { window: { latitude: 51.5, facing: "E" as const, indoor: true } };
export const northEast = { window: { latitude: 51.5, facing: "NE" as const, indoor: true } };
export const south = { window: { latitude: 51.5, facing: "S" as const, indoor: true } };
export const bench = { window: { latitude: 51.5, facing: "none" as const, indoor: false } };

export type Scenario = {
  name: string;
  season: () => SeasonProfile;
  plant: string;
  context?: FitContext;
  verdict: Verdict;
  source: string;
  /** Extra checks on the fit's reasons. */
  check?: (reasons: CheckResult[]) => void;
};

export const rule = (reasons: CheckResult[], name: string) => reasons.find((r) => r.rule === name)!;
export const kinds = (reasons: CheckResult[]) => reasons.flatMap((r) => r.facts.map((f) => f.kind));

/** One test per scenario: the plant's verdict in the spot, with the reasons printed when it differs. */
export function judgeScenarios(scenarios: Scenario[]) {
  for (const s of scenarios) {
    it(`${s.name} → ${s.plant} ${s.verdict} (${s.source})`, () => {
      const fit = fitPlant(plantByKey(s.plant)!, s.season(), undefined, s.context ?? {});
      const why = fit.reasons.map((r) => `${r.rule}:${r.level} ${describeReason(r)}`).join("\n");
      expect(fit.verdict, why).toBe(s.verdict);
      s.check?.(fit.reasons);
      expect(kinds(fit.reasons).length).toBeGreaterThan(0);
    });
  }
}
