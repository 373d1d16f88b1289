// The day-one view as the spot page shows it: what dayOne() knows of a new spot, with its dates in
// the site's words and the fits that rest on projected months grouped by verdict.
import { dayOne } from "~/.server/day-one";
import type { fitsFor } from "~/.server/profiles";
import type { DayOneView } from "~/components/day-one";
import type { SeasonProfile } from "~/domain/season/types";

const dateIn = (d: Date, timeZone: string, year = true) =>
  d.toLocaleDateString("en-GB", { day: "numeric", month: "short", ...(year ? { year: "numeric" } : {}), timeZone });

export async function dayOneFor(
  site: { id: number; timeZone: string },
  spotId: number,
  season: SeasonProfile,
  fits: ReturnType<typeof fitsFor>,
  now: Date,
): Promise<DayOneView> {
  const d = await dayOne(site, spotId, { now });
  const likelyFits = fits.filter(
    (f) => f.confidence && f.confidence !== "measured" && f.verdict !== "not enough data yet",
  );
  const likely = (["thrives here", "possible with care", "good for part of the year", "struggles here"] as const)
    .map((verdict) => ({ verdict, names: likelyFits.filter((f) => f.verdict === verdict).map((f) => f.name) }))
    .filter((l) => l.names.length > 0);
  const basisOf = likelyFits[0]?.verdictText;
  // A date-only string ("YYYY-MM-DD"), read as a calendar day.
  const day = (iso: string) =>
    new Date(`${iso}T12:00:00Z`).toLocaleDateString("en-GB", {
      day: "numeric",
      month: "short",
      year: "numeric",
      timeZone: "UTC",
    });
  const m = d.model;
  const firm = fits.find((f) => f.basis?.firmBy)?.basis?.firmBy;
  return {
    measuredMonths: season.year.filter((x) => x.coverage.enough).length,
    daysWithReadings: season.year.reduce((n, x) => n + x.coverage.daysObserved, 0),
    weather: d.weather,
    climate: d.climate,
    versus: d.versus
      ? {
          ...d.versus,
          from: dateIn(d.versus.from, site.timeZone, false),
          to: dateIn(d.versus.to, site.timeZone, false),
        }
      : null,
    model:
      m.state === "fitted"
        ? { ...m, firmBy: firm ? day(firm) : m.firmBy ? dateIn(m.firmBy, "UTC") : null }
        : m.state === "waiting"
          ? { state: "waiting", expected: m.expected ? dateIn(m.expected, site.timeZone) : null }
          : m,
    likely,
    basis: basisOf?.startsWith("likely ")
      ? basisOf
          .replace(/^likely [^—]+— /, "")
          .replace(/; firm by .*$/, "")
          .replace(/^./, (c) => c.toUpperCase())
      : null,
  };
}
