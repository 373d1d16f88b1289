// Cold glass for a windowsill: the pane's inside temperature (glass.ts, ISO 6946 surface resistance)
// on a typical night of each month, from the spot's mean daily low and humidity and the outdoor
// mean daily low (an outdoor spot of the same site), against the room air's dew point.
import { dewPoint } from "~/domain/climate/psychro";
import { paneInsideC } from "~/domain/climate/glass";
import type { CheckResult } from "~/domain/fit/facts";
import type { SeasonProfile } from "~/domain/season/types";

export type GlassContext = {
  /** Centre-of-pane U-value, W/m²K (GLAZING_U). */
  uValue: number;
  /** Outdoor mean daily low by month of the year (1–12), °C. */
  outdoorLowByMonth: Map<number, number>;
};

export function paneMonths(season: SeasonProfile, glass: GlassContext) {
  const out: { month: number; paneC: number; dewPointC: number }[] = [];
  for (const m of season.year) {
    const inside = m.temperature.meanDailyLow;
    const rh = m.humidity.mean;
    const outside = glass.outdoorLowByMonth.get(m.month);
    if (inside === null || rh === null || outside === undefined || outside >= inside) continue;
    const paneC = paneInsideC(inside, outside, glass.uValue);
    const dewPointC = dewPoint(inside, rh);
    if (paneC <= dewPointC)
      out.push({ month: m.month, paneC: Math.round(paneC * 10) / 10, dewPointC: Math.round(dewPointC * 10) / 10 });
  }
  return out;
}

/** Adds the cold-glass fact (and care) to the condensation result when the pane runs wet. */
export function coldGlass(r: CheckResult, season: SeasonProfile, glass: GlassContext): CheckResult {
  const months = paneMonths(season, glass);
  if (months.length === 0) return r;
  const keys = months.map((m) => String(m.month).padStart(2, "0"));
  return {
    ...r,
    level: r.level === "poor" ? "poor" : "care",
    noData: undefined,
    months: [...new Set([...(r.months ?? []), ...keys])],
    facts: [...r.facts, { kind: "cold-glass", months, uValue: glass.uValue }],
  };
}
