// Forecast warnings (issue 16, part 6): which coming nights at a spot are likely to cross the damage
// line of its most cold-tender placed plant, and the words of the warning, its all-clear and the
// in-app line. Pure: the server feeds it the spot's forecast nights (forecastSpot) and what is stored.
//
// "Likely" is the night's 80 % lower bound (model and forecast error), or on a clear, still night
// outdoors the leaves' low under the open sky when that is lower: radiation frost harms the leaf,
// not the air at the sensor (common practice). A night warns when its lowest hour is 12–48 h ahead:
// later than that the forecast is too loose to act on, sooner the live cold watch and its early
// warning take over. The all-clear needs the night to come back above the line by a margin, so a
// forecast hovering at the line warns once and does not flap.
import { composeMail, type Composed, type MailContext } from "~/domain/alerts/mail";
import type { ForecastNight } from "~/domain/projection/forecast";
import { formatDelta, formatTemp } from "~/domain/units";
import { MONTH_SHORT } from "~/lib/date-words";

export type Unit = "C" | "F";
const HOUR = 3_600_000;

export const FORECAST_WINDOW = { fromHours: 12, toHours: 48 } as const;
/** How far above the line the likely low must come back before the all-clear, °C. */
export const FORECAST_CLEAR_MARGIN_C = 0.5;

export const FORECAST_CAUTION =
  "Forecast warnings are a help, not a guarantee: a forecast can " +
  "be wrong by several degrees, frost can settle in hollows the " +
  "forecast does not see, and a spot's model is learned from a few " +
  "weeks of readings. On a cold night, look at your " +
  "plants yourself.";

export type TenderPlant = { name: string; damageC: number };

/** The placed plant whose damage line is highest: the first to be harmed. */
export function mostTender(plants: { name: string; damageC: number }[]): TenderPlant | null {
  let best: TenderPlant | null = null;
  for (const p of plants) if (!best || p.damageC > best.damageC) best = { name: p.name, damageC: p.damageC };
  return best;
}

/** The figure compared with the line: the lower bound, or the leaves' low when lower. */
export const likelyLow = (n: Pick<ForecastNight, "lowerBound" | "leafLow">) =>
  Math.min(n.lowerBound, n.leafLow ?? Number.POSITIVE_INFINITY);

export type NightWarning = ForecastNight & { likely: number };
export type OpenNight = { night: string };

/**
 * What to do with a spot's forecast: nights to warn of (not warned already), warned nights to clear
 * (still ahead, now clearly above the line), and warned nights to keep (updated figures, no mail).
 */
export function planForecast(input: {
  now: number;
  nights: ForecastNight[];
  tender: TenderPlant | null;
  open: OpenNight[];
}): {
  warn: NightWarning[];
  keep: NightWarning[];
  clear: string[];
} {
  const warn: NightWarning[] = [];
  const keep: NightWarning[] = [];
  const clear: string[] = [];
  const open = new Set(input.open.map((o) => o.night));
  if (!input.tender) return { warn, keep, clear };
  const damage = input.tender.damageC;
  for (const n of input.nights) {
    const likely = likelyLow(n);
    const ahead = n.at.getTime() - input.now;
    if (open.has(n.key)) {
      if (ahead > 0 && likely > damage + FORECAST_CLEAR_MARGIN_C) clear.push(n.key);
      else keep.push({ ...n, likely });
      continue;
    }
    if (ahead >= FORECAST_WINDOW.fromHours * HOUR && ahead <= FORECAST_WINDOW.toHours * HOUR && likely <= damage)
      warn.push({ ...n, likely });
  }
  return { warn, keep, clear };
}

/** "Wednesday night (16 Sep)", from the night's local start date. */
export function nightName(key: string): string {
  const d = new Date(`${key}T12:00:00Z`);
  const weekday = new Intl.DateTimeFormat("en-GB", { weekday: "long", timeZone: "UTC" }).format(d);
  return `${weekday} night (${d.getUTCDate()} ${MONTH_SHORT[d.getUTCMonth()]})`;
}

export type ForecastWarningFacts = {
  night: string;
  spotName: string;
  plantName: string;
  damageC: number;
  likelyC: number;
  expectedLowC: number;
  lowerBoundC: number;
  leafLowC: number | null;
  lowAt: Date;
};

/**
 * The in-app line and the e-mail's first sentence. "Expected" is kept for the forecast's own low (or
 * the leaves' low under a clear sky, which follows from it); a crossing only the 80 % lower bound
 * reaches is said as a real possibility, not as the expectation.
 */
export function forecastHeadline(
  w: Pick<
    ForecastWarningFacts,
    "night" | "spotName" | "plantName" | "damageC" | "expectedLowC" | "lowerBoundC" | "leafLowC"
  >,
  unit: Unit,
): string {
  const t = (c: number) => formatTemp(c, unit);
  let what: string;
  if (w.expectedLowC <= w.damageC) what = `${t(w.expectedLowC)} expected on ${w.spotName}`;
  else if (w.leafLowC !== null && w.leafLowC <= w.damageC)
    what = `${t(w.leafLowC)} expected on the leaves at ${w.spotName} under a clear, still sky (air ${t(w.expectedLowC)})`;
  else what = `${t(w.expectedLowC)} expected on ${w.spotName}, and ${t(w.lowerBoundC)} quite possible`;
  return `${nightName(w.night)}: ${what}; the ${w.plantName}'s limit is ${t(w.damageC)} — bring it in.`;
}

/** How the figure was reached, in words. */
export function forecastDetail(w: ForecastWarningFacts, unit: Unit, timeZone: string): string {
  const at = new Intl.DateTimeFormat("en-GB", {
    timeZone,
    weekday: "short",
    hour: "2-digit",
    minute: "2-digit",
  }).format(w.lowAt);
  const leaf =
    w.leafLowC !== null
      ? ` The night looks clear and still: leaves under the open sky ` +
        `run about ` +
        `${formatDelta(Math.abs(w.expectedLowC - w.leafLowC), unit)} ` +
        `below the air, so about ${formatTemp(w.leafLowC, unit)} ` +
        `on the leaves.`
      : "";
  return (
    `The forecast through this spot's model: lowest about ` +
    `${formatTemp(w.expectedLowC, unit)} around ${at}, with a ` +
    `1-in-10 chance of ${formatTemp(w.lowerBoundC, unit)} or ` +
    `lower.${leaf}`
  );
}

export type ForecastMailContext = MailContext;

function render(subject: string, lines: string[], c: ForecastMailContext): Composed {
  const why = `You get this because you are a member of ${c.siteName} and asked for cold-snap alerts.`;
  return composeMail(subject, lines, c, FORECAST_CAUTION, why);
}

export function forecastWarningMessage(c: ForecastMailContext, w: ForecastWarningFacts): Composed {
  return render(
    `Cold night forecast for ${c.spotName}: ${nightName(w.night).replace(/ \(.*\)$/, "")} may reach ${formatTemp(w.likelyC, c.unit)}`,
    [
      forecastHeadline(w, c.unit),
      forecastDetail(w, c.unit, c.timeZone),
      `What to do: before dusk, bring the ${w.plantName} (and ` +
        `anything as tender) indoors or into a frost-free shed; if it ` +
        `cannot move, fleece it and keep it off cold ground.`,
      "You will get an all-clear if the forecast changes and the " +
        "night no longer looks likely to cross the line. Your live cold " +
        "watch still alerts you on the night.",
    ],
    c,
  );
}

export function forecastClearMessage(c: ForecastMailContext, w: ForecastWarningFacts): Composed {
  return render(
    `All clear: ${nightName(w.night).replace(/ \(.*\)$/, "")} no longer looks too cold at ${c.spotName}`,
    [
      `The forecast has changed: ${nightName(w.night)} at ` +
        `${c.spotName} (${c.siteName}) no longer looks likely to fall ` +
        `under the ${w.plantName}'s ` +
        `${formatTemp(w.damageC, c.unit)} limit.`,
      forecastDetail(w, c.unit, c.timeZone),
      "Forecasts change again: if the plant is already in, leaving it in for the night does no harm.",
    ],
    c,
  );
}
