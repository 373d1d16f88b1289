// Early warning: a straight-line fit over the recent readings of a falling (or rising) temperature,
// and when the line reaches the threshold within the horizon, how long until it does. The fit must
// be good (r²) and the rate real, so sensor noise around a steady value never projects a crossing.
// What a fit needs is time covered, not a count of readings: three readings spanning half an hour
// show a trend as well as sixty do, so a sensor that reports every 15 or 20 minutes warns too.
// Three windows: the hour (a front), the half hour (a front's first minutes, stricter), and three
// hours with a lower rate and a longer horizon (a clear night's slow, steady drift to the line).
import { linearRegression, linearRegressionLine, rSquared } from "simple-statistics";
import { isPast, type AlertKind, type Point } from "~/domain/alerts/rules";

export type Projection = { minutes: number; ratePerHour: number; fittedNow: number };

export type FitWindow = {
  windowMinutes: number;
  /** How far ahead a crossing on this window's line counts, minutes. */
  horizonMinutes: number;
  /** At least this many readings, spread over at least `minSpanShare` of the window. */
  minPoints: number;
  minSpanShare: number;
  /** A fall slower than this is the ordinary evening drift, not a front (common practice). */
  minRatePerHour: number;
  minRSquared: number;
};

export const EARLY_WARNING: { windows: FitWindow[] } = {
  windows: [
    { windowMinutes: 60, horizonMinutes: 60, minPoints: 3, minSpanShare: 0.5, minRatePerHour: 1, minRSquared: 0.7 },
    { windowMinutes: 30, horizonMinutes: 60, minPoints: 5, minSpanShare: 0.6, minRatePerHour: 2, minRSquared: 0.85 },
    // A clear night loses 0.5–1 °C an hour for hours on end (common practice): warn up to two hours
    // ahead, but only on a long, clean line so the evening's ordinary cooling stays quiet.
    {
      windowMinutes: 180,
      horizonMinutes: 120,
      minPoints: 4,
      minSpanShare: 0.6,
      minRatePerHour: 0.4,
      minRSquared: 0.85,
    },
  ],
};

/** The longest stretch of history any window reads, minutes: what the engine must fetch. */
export const EARLY_WARNING_HISTORY_MINUTES = Math.max(...EARLY_WARNING.windows.map((w) => w.windowMinutes));

/**
 * Minutes until the fitted line crosses `threshold`, or null when it will not within the horizon,
 * the spot is already past it, or the fit is not trustworthy. `points` sorted by time; `minuteMs`
 * scales the window, horizon and rate for the compressed demo front.
 */
export function projectCrossing(
  kind: AlertKind,
  threshold: number,
  points: Point[],
  minuteMs = 60_000,
  cfg = EARLY_WARNING,
): Projection | null {
  if (kind !== "cold" && kind !== "heat") return null;
  if (points.length === 0) return null;
  for (const w of cfg.windows) {
    const p = fitWindow(kind, threshold, points, minuteMs, w);
    if (p) return p;
  }
  return null;
}

function fitWindow(
  kind: AlertKind,
  threshold: number,
  points: Point[],
  minuteMs: number,
  cfg: FitWindow,
): Projection | null {
  const last = points[points.length - 1].at.getTime();
  const windowMs = cfg.windowMinutes * minuteMs;
  const recent = points.filter((p) => p.at.getTime() > last - windowMs && Number.isFinite(p.value));
  if (recent.length < cfg.minPoints) return null;
  if (last - recent[0].at.getTime() < windowMs * cfg.minSpanShare) return null;
  // x in rule minutes before the last reading keeps the numbers small and well conditioned.
  const xy = recent.map((p) => [(p.at.getTime() - last) / minuteMs, p.value]);
  const fit = linearRegression(xy);
  const line = linearRegressionLine(fit);
  const r2 = rSquared(xy, line);
  const ratePerHour = fit.m * 60;
  const falling = kind === "cold";
  if (falling ? ratePerHour > -cfg.minRatePerHour : ratePerHour < cfg.minRatePerHour) return null;
  if (!(r2 >= cfg.minRSquared)) return null;
  const fittedNow = line(0);
  const latest = recent[recent.length - 1].value;
  if (falling ? latest < threshold || fittedNow < threshold : latest > threshold || fittedNow > threshold) return null;
  const minutes = (threshold - fittedNow) / fit.m;
  if (!(minutes >= 0) || minutes > cfg.horizonMinutes) return null;
  return { minutes, ratePerHour, fittedNow };
}

/**
 * The early warning a batch of fresh readings calls for: each reading of the batch in turn, as if
 * they had come one by one, the newest projection winning, counted from the batch's last reading.
 * Null when none projects a crossing, or the latest reading is already past the threshold (that is
 * the alert's business, not a warning's). `history` sorted by time and covering the batch.
 */
export function projectBatch(
  kind: AlertKind,
  threshold: number,
  history: Point[],
  batch: Point[],
  minuteMs = 60_000,
): Projection | null {
  if (batch.length === 0) return null;
  const latest = batch[batch.length - 1];
  let projection: Projection | null = null;
  for (const b of batch) {
    const upTo = history.filter((p) => p.at.getTime() <= b.at.getTime());
    const p = projectCrossing(kind, threshold, upTo, minuteMs);
    if (p) projection = { ...p, minutes: p.minutes - (latest.at.getTime() - b.at.getTime()) / minuteMs };
  }
  if (projection && (projection.minutes < 0 || isPast(kind, threshold, latest.value))) return null;
  return projection;
}

/** "about 40 minutes": to the nearest 5 minutes past a quarter of an hour, never "0"; hours past 90 minutes. */
export function roundMinutes(minutes: number): string {
  if (minutes < 7.5) return "a few minutes";
  if (minutes >= 90) return `about ${Math.round(minutes / 30) / 2} hours`;
  const m = minutes < 15 ? Math.round(minutes) : Math.round(minutes / 5) * 5;
  return `about ${m} minutes`;
}
