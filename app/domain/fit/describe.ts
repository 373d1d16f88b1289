// Words for the fit rules' facts, in the grower's unit and locale. The rules return numbers and
// dates only (checks.ts); this is the one place that turns them into sentences.
import type { Fact, CheckResult } from "~/domain/fit/facts";
import { MONTH_NAMES } from "~/domain/season/profile";
import { FACING_WORDS, type WindowFacing } from "~/domain/vocabulary";
import {
  type Format,
  DEFAULT_FORMAT,
  numberFormat,
  formatNumber,
  temp,
  delta,
  degreeHours,
  count,
  describeMonths,
  episodes,
  pct,
  DLI,
  rangeWords,
  pastYears,
} from "~/domain/fit/describe-format";

export {
  DEFAULT_FORMAT,
  day,
  delta,
  describeMonths,
  formatNumber,
  temp,
  type Format,
} from "~/domain/fit/describe-format";
export { describeSeasonal, describeVerdict } from "~/domain/fit/describe-verdict";

/** One fact in words. */
export function describeFact(fact: Fact, f: Format = DEFAULT_FORMAT, name = "this group"): string {
  switch (fact.kind) {
    case "cold-ok":
      return `Nights stayed at about ${temp(fact.comfortC, f)} or above (lowest ${temp(fact.lowestC, f)}).`;
    case "cold-snap":
      return (
        `A brief cold snap: ${count(fact.nights, "night", "nights", f)} under ${temp(fact.comfortC, f)} (${episodes(fact.worst, f)}), ` +
        `above the ${temp(fact.damageC, f)} damage line — cover it or bring it in on such nights.`
      );
    case "cold-season":
      return (
        `A cold season, not a snap: ` +
        `${count(fact.nights, "night", "nights", f)} under ` +
        `${temp(fact.comfortC, f)} ${describeMonths(fact.months)}, ` +
        `typically ${temp(fact.typicalLowC, f)} ` +
        `(${degreeHours(fact.degreeHours, f)} under); ${name} slows down in such a spell and is harmed under ${temp(fact.damageC, f)}.`
      );
    case "cold-damage":
      return (
        `Cold past the damage line: ` +
        `${count(fact.nights, "night", "nights", f)} under ` +
        `${temp(fact.damageC, f)} (${episodes(fact.worst, f)}), where ` +
        `${name} is harmed.`
      );
    case "warm-nights-ok":
      return `Nights cooled to ${temp(fact.maxNightC, f)} or below (warmest night's low ${temp(fact.warmestLowC, f)}).`;
    case "warm-nights":
      return fact.season
        ? `Warm nights for a cool grower: ` +
            `${count(fact.nights, "night", "nights", f)} stayed above ` +
            `${temp(fact.maxNightC, f)} ${describeMonths(fact.months)}, ` +
            `typically ${temp(fact.typicalLowC, f)} — ${name} grows and ` +
            `flowers poorly without cool nights.`
        : `A few warm nights (${count(fact.nights, "night", "nights", f)} ` +
            `above ${temp(fact.maxNightC, f)} ${describeMonths(fact.months)}` +
            `), not a season of them.`;
    case "heat-ok":
      return `Days stayed at ${temp(fact.comfortC, f)} or below (highest ${temp(fact.highestC, f)}).`;
    case "heat-snap":
      return (
        `A brief hot spell: ${count(fact.days, "day", "days", f)} over ` +
        `${temp(fact.comfortC, f)} (${episodes(fact.worst, f)}), under ` +
        `the ${temp(fact.damageC, f)} damage line. ` +
        (fact.costsSpikes ? `Warm days hold back ${name}'s spikes. ` : "") +
        "Shade at midday and moving air help."
      );
    case "heat-season":
      return (
        `A hot season, not a spell: ` +
        `${count(fact.days, "day", "days", f)} over ` +
        `${temp(fact.comfortC, f)} ${describeMonths(fact.months)}, ` +
        `typically ${temp(fact.typicalHighC, f)}; ` +
        `harm starts above ${temp(fact.damageC, f)}.` +
        (fact.costsSpikes ? ` ${name} won't spike while days stay this warm.` : "")
      );
    case "heat-damage":
      return (
        `Heat past the damage line: ` +
        `${count(fact.days, "day", "days", f)} over ` +
        `${temp(fact.damageC, f)} (${episodes(fact.worst, f)}), where ` +
        `${name} is harmed.`
      );
    case "humidity-ok":
      return `Humidity stayed in ${name}'s ${fact.minPct}–${pct(fact.maxPct)} range through the day (driest daily low ${pct(fact.lowestDailyMinPct)}).`;
    case "humidity-dry":
      return (
        `Dry hours: on ${numberFormat(f.locale, 0).format(fact.dryDays)}` +
        ` of ${count(fact.days, "day", "days", f)} ` +
        `${describeMonths(fact.months)} the air fell under ` +
        `${pct(fact.minPct)}, typically to ` +
        `${pct(fact.typicalDailyMinPct)} ` +
        `(lowest ${pct(fact.lowestPct)}). A tray of wet gravel, grouping plants or a humidifier raises it.`
      );
    case "humidity-damp":
      return (
        `The air averaged up to ${pct(fact.meanPct)} ` +
        `${describeMonths(fact.months)}, above ${name}'s ` +
        `${pct(fact.maxPct)}; more air movement lets leaves dry ` +
        `between waterings.`
      );
    case "light-months": {
      const parts = [
        `Daily light by month against ${formatNumber(fact.minDli, f.locale)}–${formatNumber(fact.maxDli, f.locale)} ${DLI}:`,
      ];
      const at = (ms: number[]) =>
        ms
          .map(
            (m) =>
              `${MONTH_NAMES[m - 1].slice(0, 3)} ${formatNumber(fact.months.find((x) => x.month === m)!.dli, f.locale)}`,
          )
          .join(", ");
      if (fact.dim.length)
        parts.push(`too dim ${describeMonths(fact.dim)} (${at(fact.dim)}) — a brighter place or a grow light then;`);
      if (fact.scorch.length)
        parts.push(
          `far too bright ${describeMonths(fact.scorch)} (${at(fact.scorch)}) — shade from direct sun or it scorches;`,
        );
      else if (fact.bright.length)
        parts.push(`too bright ${describeMonths(fact.bright)} (${at(fact.bright)}) — some shade then;`);
      if (!fact.dim.length && !fact.bright.length)
        parts.push(`inside it in every measured month (${at(fact.months.map((x) => x.month))});`);
      if (fact.unmeasured.length) parts.push(`not measured ${describeMonths(fact.unmeasured)}.`);
      return parts.join(" ").replace(/;$/, ".");
    }
    case "light-clipped":
      return `The light sensor hit its ceiling ${describeMonths(fact.months)}: direct sun reads lower than it is, so those months may be brighter than shown.`;
    case "light-window": {
      const where = `a ${FACING_WORDS[fact.facing as WindowFacing] ?? fact.facing}-facing window`;
      if (fact.verdict === "scorch")
        return (
          `No light sensor; by the sun's path ${where} gets hot direct ` +
          `sun ${describeMonths(fact.strongSunMonths)} — ${name} wants ` +
          `little or no direct sun, so shade it then (a sheer curtain) or ` +
          `it scorches.`
        );
      if (fact.verdict === "shade")
        return (
          `No light sensor; by the sun's path ${where} gets a few hours ` +
          `of strong sun in ` +
          `${fact.sunnyMonths === 0 ? "no month" : `only ${count(fact.sunnyMonths, "month", "months", f)}`}` +
          ` — ${name} wants ` +
          `${fact.need === "high" ? "strong light with some direct sun" : "bright light"}` +
          `; it may grow but rarely flower without a grow light.`
        );
      return fact.need === "low"
        ? `No light sensor; ${where} gets no hot direct sun, which suits ${name}; how bright it is isn't measured.`
        : `No light sensor; by the sun's path ${where} can give ${name} ` +
            `enough sun, but trees, walls and curtains can take it away — a ` +
            `light sensor would tell.`;
    }
    case "light-unknown":
      return fact.reason === "outdoor"
        ? `Light isn't measured here; ${name} wants ` +
            `${formatNumber(fact.minDli, f.locale)}–` +
            `${formatNumber(fact.maxDli, f.locale)} ${DLI}` +
            `${fact.need === "low" ? " — keep it in shade outdoors" : ""}.`
        : `Light isn't known: no light sensor and no window facing set. ` +
            `${name} wants ${formatNumber(fact.minDli, f.locale)}–` +
            `${formatNumber(fact.maxDli, f.locale)} ${DLI}; set the window ` +
            `facing or add a light sensor.`;
    case "cue-none":
      return "No temperature cue needed to flower.";
    case "cue-met": {
      const cond = [
        fact.maxNightC !== undefined ? `nights at ${temp(fact.maxNightC, f)} or below` : "",
        fact.maxDayC !== undefined ? `days at ${temp(fact.maxDayC, f)} or below` : "",
      ]
        .filter(Boolean)
        .join(" and ");
      return (
        `Flowering cue met: ${count(fact.days, "day", "days", f)} with ` +
        `${cond} ${describeMonths(fact.months)}, in season for ${name} (` +
        `${fact.weeks} weeks needed).` +
        (fact.dryRest ? " Keep it nearly dry through that rest: watered, it grows instead of flowering." : "")
      );
    }
    case "cue-missed": {
      const cond = [
        fact.maxNightC !== undefined ? `nights at ${temp(fact.maxNightC, f)} or below` : "",
        fact.maxDayC !== undefined ? `days at ${temp(fact.maxDayC, f)} or below` : "",
      ]
        .filter(Boolean)
        .join(" and ");
      const when = fact.cueMonths.length ? ` ${describeMonths(fact.cueMonths)}` : "";
      const late = fact.outOfSeason.length
        ? ` The cool spell here comes ${describeMonths(fact.outOfSeason)}, out of season for spiking.`
        : "";
      return (
        `Flowering cue missed: ${name} wants about ${fact.weeks} weeks ` +
        `of ${cond}${when}; the best stretch here had ` +
        `${count(fact.bestDays, "day", "days", f)}.${late} It may grow ` +
        `but not flower.` +
        (fact.dryRest ? " The rest must also be kept nearly dry." : "")
      );
    }
    case "dif-met":
      return (
        `Day–night difference (the day's high minus its low) of ` +
        `${delta(fact.needC, f)} or more ` +
        `${describeMonths(fact.months.map((x) => x.month))} (` +
        `${fact.months.map((x) => `${MONTH_NAMES[x.month - 1].slice(0, 3)} ${delta(x.difC, f)}`).join(", ")}).`
      );
    case "dif-missed":
      return (
        `The day's high ran at most ${delta(fact.bestC, f)} over its ` +
        `low in a typical day of any month` +
        `${fact.bestMonth ? ` (${MONTH_NAMES[fact.bestMonth - 1]})` : ""}` +
        `; ${name} flowers best with about ${delta(fact.needC, f)} — it ` +
        `may grow but flower poorly.`
      );
    case "condensation-ok":
      return (
        `The air came within ${delta(fact.marginC, f)} of its dew point ` +
        `for ${count(Math.round(fact.hours), "hour", "hours", f)} in all ` +
        `— little risk of wet leaves.`
      );
    case "condensation-wet":
      return fact.expected
        ? `Near the dew point for ` +
            `${count(Math.round(fact.hours), "hour", "hours", f)} (` +
            `${Math.round(fact.worstShare * 100)} % of the time in ` +
            `${MONTH_NAMES[fact.worstMonth - 1]}) — normal for ${name}'s ` +
            `humid range; keep the air moving so leaves dry.`
        : `The air sat within ${delta(fact.marginC, f)} of its dew point ` +
            `for ${count(Math.round(fact.hours), "hour", "hours", f)}, ` +
            `${fact.months.length === 12 ? "in every month" : `most ${describeMonths(fact.months)}`}` +
            ` (${Math.round(fact.worstShare * 100)} % of the time in ` +
            `${MONTH_NAMES[fact.worstMonth - 1]}): leaves stay wet, which ` +
            `invites rot. More air movement and watering early in ` +
            `the day help.`;
    case "cold-glass": {
      const panes = fact.months
        .map(
          (m) =>
            `in ${MONTH_NAMES[m.month - 1]} sits near ${temp(m.paneC, f)}, ` +
            `at or under the room's ${temp(m.dewPointC, f)} dew point`,
        )
        .join("; ");
      return (
        `Cold glass: with U ${formatNumber(fact.uValue, f.locale)} ` +
        `glazing the pane's inside ` +
        `${panes}` +
        ` — water runs on the glass; keep leaves off it.`
      );
    }
    case "projected-cold": {
      const month = MONTH_NAMES[fact.worstMonth - 1];
      const within = `(80 % range ${rangeWords(fact.rangeC, f)}, ${pastYears(fact.years)})`;
      if (fact.line === "damage")
        return (
          `${month} is likely to fall to ${temp(fact.lowC, f)} here ` +
          `${within}, under ${name}'s ${temp(fact.lineC, f)} damage line: ` +
          `plan to move it ${describeMonths(fact.months)}. Not measured ` +
          `yet — a projection.`
        );
      if (fact.line === "comfort")
        return (
          `Nights ${describeMonths(fact.months)} are likely to run under ` +
          `${temp(fact.lineC, f)}, typically ${temp(fact.lowC, f)} in ` +
          `${month} ${within}: a cold season for ${name}; plan a warmer ` +
          `place then. Not measured yet — a projection.`
        );
      return (
        `A few nights ${describeMonths(fact.months)} are likely to dip ` +
        `under ${temp(fact.lineC, f)} (about ${temp(fact.lowC, f)} at ` +
        `the coldest in ${month}, ${within.slice(1, -1)}): cover it or ` +
        `bring it in then.`
      );
    }
    case "projected-heat": {
      const month = MONTH_NAMES[fact.worstMonth - 1];
      const within = `(80 % range ${rangeWords(fact.rangeC, f)}, ${pastYears(fact.years)})`;
      if (fact.line === "damage")
        return (
          `${month} is likely to reach ${temp(fact.highC, f)} here ` +
          `${within}, over ${name}'s ${temp(fact.lineC, f)} damage line: ` +
          `plan shade or another place ${describeMonths(fact.months)}. Not ` +
          `measured yet — a projection.`
        );
      if (fact.line === "comfort")
        return (
          `Days ${describeMonths(fact.months)} are likely to run over ` +
          `${temp(fact.lineC, f)}, typically ${temp(fact.highC, f)} in ` +
          `${month} ${within}: plan shade and moving air then. Not ` +
          `measured yet — a projection.`
        );
      return (
        `A few days ${describeMonths(fact.months)} are likely to pass ` +
        `${temp(fact.lineC, f)} (about ${temp(fact.highC, f)} at the ` +
        `warmest in ${month}, ${within.slice(1, -1)}): shade at ` +
        `midday then.`
      );
    }
    case "projected-warm-nights":
      return (
        `Nights ${describeMonths(fact.months)} are likely to stay above ` +
        `${temp(fact.maxNightC, f)}, typically ${temp(fact.lowC, f)} in ` +
        `${MONTH_NAMES[fact.worstMonth - 1]} (80 % range ` +
        `${rangeWords(fact.rangeC, f)}, ${pastYears(fact.years)}): ` +
        `${name} grows and flowers poorly without cool nights. Not ` +
        `measured yet — a projection.`
      );
    case "projected-humidity":
      return fact.side === "dry"
        ? `The air is likely to average about ${pct(fact.meanPct)} ` +
            `${describeMonths(fact.months)}, under ${name}'s ` +
            `${pct(fact.limitPct)} (${pastYears(fact.years)}): plan a tray, ` +
            `grouping or a humidifier then.`
        : `The air is likely to average about ${pct(fact.meanPct)} ` +
            `${describeMonths(fact.months)}, above ${name}'s ` +
            `${pct(fact.limitPct)} (${pastYears(fact.years)}): keep the air ` +
            `moving then.`;
    case "projected-ok":
      return fact.side === "cold"
        ? `The months not measured yet are likely to stay above ${temp(fact.lineC, f)} (coldest likely ${temp(fact.valueC, f)}, ${pastYears(fact.years)}).`
        : `The months not measured yet are likely to stay under ${temp(fact.lineC, f)} (warmest likely ${temp(fact.valueC, f)}, ${pastYears(fact.years)}).`;
    case "projected-cue":
      return fact.cue === "cool"
        ? `The cool spell ${name} needs to flower is likely ${describeMonths(fact.months)} (projected, ${pastYears(fact.years)}).`
        : `The day–night difference ${name} flowers best with is likely ${describeMonths(fact.months)} (projected, ${pastYears(fact.years)}).`;
  }
}

/** A rule's result in words: its facts joined, or what is not known. */
export function describeReason(r: CheckResult, f: Format = DEFAULT_FORMAT, name?: string): string {
  if (r.facts.length === 0) {
    return r.rule === "light"
      ? "Light isn't measured here, so it isn't known whether it suits."
      : `No ${r.rule === "humidity" ? "humidity" : r.rule === "condensation" ? "temperature and humidity" : "temperature"} readings yet, so this isn't judged.`;
  }
  return r.facts.map((x) => describeFact(x, f, name)).join(" ");
}
