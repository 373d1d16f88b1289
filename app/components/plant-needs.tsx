import { MonthStrip } from "~/components/month-strip";
import type { PlantProfile } from "~/domain/plants/library";
import { deltaToUnit, formatTemp, type TempUnit } from "~/domain/units";

type Need = { label: string; value: string; fields: string[] };

export function needsOf(p: PlantProfile, unit: TempUnit): Need[] {
  const f = p.flowering;
  const cue = [
    f.difC != null ? `days about ${deltaToUnit(f.difC, unit).toFixed(0)} °${unit} warmer than nights` : null,
    f.coolPeriod
      ? `${f.coolPeriod.weeks} weeks of ${[
          f.coolPeriod.maxNightC != null ? `nights at or below ${formatTemp(f.coolPeriod.maxNightC, unit, 0)}` : null,
          f.coolPeriod.maxDayC != null ? `days at or below ${formatTemp(f.coolPeriod.maxDayC, unit, 0)}` : null,
        ]
          .filter(Boolean)
          .join(
            " and ",
          )}${f.coolPeriod.months ? ` (${f.coolPeriod.months})` : ""}${f.coolPeriod.dryRest ? ", kept nearly dry" : ""}`
      : null,
  ].filter(Boolean);
  return [
    // Cool / intermediate / warm are orchid terms.
    ...(p.group === "orchid"
      ? [{ label: "Temperature group", value: `${p.category} growing`, fields: ["category"] }]
      : []),
    { label: "Lowest comfortable night", value: formatTemp(p.minNightC, unit, 0), fields: ["minNightC"] },
    { label: "Highest comfortable day", value: formatTemp(p.maxDayC, unit, 0), fields: ["maxDayC"] },
    ...(p.maxNightC != null
      ? [
          {
            label: "Warmest comfortable night",
            value: formatTemp(p.maxNightC, unit, 0),
            fields: ["damageNightC/damageDayC/maxNightC"],
          },
        ]
      : []),
    ...(p.damageNightC != null && p.damageDayC != null
      ? [
          {
            label: "Harmed below / above",
            value: `${formatTemp(p.damageNightC, unit, 0)} / ${formatTemp(p.damageDayC, unit, 0)}`,
            fields: ["damageNightC/damageDayC/maxNightC"],
          },
        ]
      : []),
    { label: "Humidity", value: `${p.humidityMin}–${p.humidityMax} %`, fields: ["humidityMin/humidityMax"] },
    { label: "Light", value: p.light, fields: ["light"] },
    { label: "Daily light integral", value: `${p.dliMin}–${p.dliMax} mol m⁻² d⁻¹`, fields: ["dliMin/dliMax"] },
    { label: "To flower", value: `${cue.length ? `${cue.join("; ")}. ` : ""}${f.note}`, fields: ["flowering"] },
    { label: "Cold tolerance", value: p.coldTolerance, fields: ["coldTolerance"] },
  ];
}

export const sourcesFor = (p: PlantProfile, fields: string[]) =>
  p.sources.filter((s) => fields.some((f) => s.field === f || s.field.startsWith(`${f}.`)));

/** A reason's twelve months (passes, care, fails), for the reasons judged month by month. */
export const stripOf = (r: { rule: string }) => ("strip" in r && typeof r.strip === "string" ? r.strip : null);
export function ReasonStrip({ reason }: { reason: { rule: string } }) {
  const code = stripOf(reason);
  return code ? <MonthStrip rule={reason.rule} code={code} /> : null;
}
