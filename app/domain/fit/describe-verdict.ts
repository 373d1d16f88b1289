// A fit's verdict and a seasonal plant's months in words, with what they rest on.
import { DEFAULT_FORMAT, describeMonths, pastYears, temp, type Format } from "~/domain/fit/describe-format";
import { MONTH_NAMES } from "~/lib/date-words";

/** "17 May" from a local date key, with the year when it is not this one's. */
function firmDate(key: string, f: Format, now: Date): string {
  const [y, m, d] = key.split("-").map(Number);
  const opts: Intl.DateTimeFormatOptions = {
    day: "numeric",
    month: "long",
    timeZone: "UTC",
    ...(y !== now.getUTCFullYear() ? { year: "numeric" } : {}),
  };
  return new Intl.DateTimeFormat(f.locale ?? "en-GB", opts).format(new Date(Date.UTC(y, m - 1, d)));
}

/**
 * The verdict with what it rests on: "likely thrives here — 3 of 12 months measured, the rest
 * projected from 10 past years of weather; firm by 14 May". A verdict on measured months alone is
 * the verdict as it is.
 */
export function describeVerdict(
  fit: {
    verdict: string;
    confidence: "measured" | "projected" | "mixed";
    basis: {
      measuredMonths: number[];
      projectedMonths: number[];
      blendedMonths: number[];
      years: number;
      firmBy: string | null;
    } | null;
  },
  f: Format = DEFAULT_FORMAT,
  now = new Date(),
): string {
  // "Not enough data yet" is no verdict to call likely (months neither measured nor projected remain).
  if (fit.confidence === "measured" || !fit.basis || fit.verdict === "not enough data yet") return fit.verdict;
  const b = fit.basis;
  const measured =
    b.measuredMonths.length === 0 ? "no month measured yet" : `${b.measuredMonths.length} of 12 months measured`;
  const partly = b.blendedMonths.length
    ? ` (${b.blendedMonths.length === 1 ? MONTH_NAMES[b.blendedMonths[0] - 1] : `${b.blendedMonths.length} months`} partly)`
    : "";
  const rest = b.measuredMonths.length === 0 ? "all projected" : "the rest projected";
  const firm = b.firmBy ? `; firm by ${firmDate(b.firmBy, f, now)}` : "";
  return `likely ${fit.verdict} — ${measured}${partly}, ${rest} ${pastYears(b.years)}${firm}`;
}

/** "Good from May to September; bring it in before nights fall under 4.5 °C." */
export function describeSeasonal(
  seasonal: { months: number[]; bringInBelowC: number },
  f: Format = DEFAULT_FORMAT,
): string {
  return `Good ${describeMonths(seasonal.months)}; bring it in before nights fall under ${temp(seasonal.bringInBelowC, f)}.`;
}
