// The fit checks: each judges one side of a spot's season against a plant group and returns a level
// and the facts behind it (facts.ts) — never sentences. describe.ts turns the facts into words in
// the grower's unit; the JSON route returns them as they are. The checks themselves are in
// temperature.ts, humidity-light.ts, flowering.ts and condensation.ts.
//
// The model: every limit has two lines, a comfort line (the group grows well inside it) and a damage
// line (the plant is harmed past it), and what counts is how long and how far the spot goes past
// each: degree-hours, nights, and whether it is a brief snap or a season of weeks.
import { condensation } from "~/domain/fit/condensation";
import { linesOf, type FitCheck, type FitThresholds, type CheckResult } from "~/domain/fit/facts";
import { floweringNeeds } from "~/domain/fit/flowering";
import { humidityBand, lightBand } from "~/domain/fit/humidity-light";
import { coldNights, hotDays, warmNights } from "~/domain/fit/temperature";
import type { PlantProfile } from "~/domain/plants/library";
import type { SeasonProfile } from "~/domain/season/types";

export const FIT_CHECKS: FitCheck[] = [
  coldNights,
  warmNights,
  hotDays,
  humidityBand,
  lightBand,
  floweringNeeds,
  condensation,
];

/**
 * What each rule reads of a plant profile. Plants alike in these get the same result in the same
 * season, so a fit table judges each distinct case once. A rule added without an entry is never shared.
 */
const CHECK_INPUTS = new Map<FitCheck, (p: PlantProfile) => string>([
  [coldNights, (p) => `${p.minNightC}|${linesOf(p).damageNightC}`],
  [warmNights, (p) => `${p.maxNightC}`],
  [hotDays, (p) => `${p.maxDayC}|${linesOf(p).damageDayC}|${p.flowering.coolPeriod?.maxDayC !== undefined}`],
  [humidityBand, (p) => `${p.humidityMin}|${p.humidityMax}`],
  [lightBand, (p) => `${p.dliMin}|${p.dliMax}|${p.light}`],
  [floweringNeeds, (p) => JSON.stringify(p.flowering)],
  [condensation, (p) => `${p.humidityMax >= 88}`],
]);

const judged = new WeakMap<SeasonProfile, WeakMap<FitThresholds, Map<string, CheckResult>>>();

/** Every rule's result for a plant in a season, in FIT_CHECKS order. Results are shared: don't mutate them. */
export function judgeAll(profile: PlantProfile, season: SeasonProfile, t: FitThresholds): CheckResult[] {
  let byThresholds = judged.get(season);
  if (!byThresholds) judged.set(season, (byThresholds = new WeakMap()));
  let known = byThresholds.get(t);
  if (!known) byThresholds.set(t, (known = new Map()));
  return FIT_CHECKS.map((rule, i) => {
    const inputs = CHECK_INPUTS.get(rule);
    if (!inputs) return rule(profile, season, t);
    const key = `${i}|${inputs(profile)}`;
    let result = known.get(key);
    if (!result) known.set(key, (result = rule(profile, season, t)));
    return result;
  });
}
