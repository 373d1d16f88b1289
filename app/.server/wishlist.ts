// The wishlist as its page shows it: each wished plant judged against every spot of the site (measured
// months, and projected ones where a spot's latest twelve months reach today), the plan that shares
// out the spots' room, and the period it was judged on.
import { siteInventory, sitePlants, siteWishlist } from "~/.server/plants";
import { fitSummary, judgedPeriods, parsePeriod, pickableMonths, spotProfiles, windowOf } from "~/.server/profiles";
import { fitProjections } from "~/.server/projections";
import { getSite } from "~/.server/sites";
import { listSpots } from "~/.server/spots";
import { rankSpotsForPlant, VERDICT_ORDER } from "~/domain/fit/verdict";
import { planWishlist, type WishRow } from "~/domain/fit/wishlist";
import { periodLabel } from "~/domain/season/period";
import type { TempUnit } from "~/domain/units";

export async function wishlistView(
  siteId: number,
  { unit, period, now }: { unit: TempUnit; period: string | null; now: Date },
) {
  const [site, spots, plants, wishes, inventory] = await Promise.all([
    getSite(siteId),
    listSpots(siteId),
    sitePlants(siteId),
    siteWishlist(siteId),
    siteInventory(siteId),
  ]);
  const byKey = new Map(plants.map((p) => [p.key, p]));
  const wanted = wishes.filter((w) => byKey.has(w.plantKey));
  const { choice, problem: periodProblem } = parsePeriod(period, now, site.timeZone);
  const spotIds = spots.map((s) => s.id);
  const periods = wanted.length ? await judgedPeriods(site, spotIds, choice, now) : new Map();
  const profiles = wanted.length ? await spotProfiles(site, spotIds, now, { plants, periods }) : new Map();
  // Months not measured yet are judged from each spot's projection (issue 16); a past period stays as measured.
  const projections = wanted.length
    ? await fitProjections(
        new Map(spots.filter((s) => periods.get(s.id)?.toToday).map((s) => [s.id, profiles.get(s.id)!] as const)),
        { now },
      )
    : new Map();
  const withSeason = spots.map((s) => ({
    spot: s,
    season: profiles.get(s.id)!,
    window: windowOf(site, s),
    projection: projections.get(s.id),
  }));
  const ranked = wanted.map((w) => ({
    wish: w,
    fits: rankSpotsForPlant(byKey.get(w.plantKey)!, withSeason).map((r) => ({
      spotId: r.spot.spot.id,
      verdict: r.fit.verdict,
      likely: !!r.fit.confidence && r.fit.confidence !== "measured" && r.fit.verdict !== "not enough data yet",
      reason: fitSummary(byKey.get(w.plantKey)!, r.fit, { unit }).reasons[0]?.message ?? null,
    })),
  }));
  const reasonIn = (i: number, spotId: number | undefined) =>
    ranked[i].fits.find((f) => f.spotId === spotId)?.reason ?? null;
  const plan = planWishlist(
    spots.map((s) => ({
      id: s.id,
      name: s.name,
      capacity: s.capacity,
      standingPots: inventory.filter((i) => i.spotId === s.id).reduce((n, i) => n + i.pots, 0),
    })),
    ranked.map((r) => ({ plantKey: r.wish.plantKey, mustHave: r.wish.mustHave, pots: r.wish.pots, fits: r.fits })),
  );
  const spotName = new Map(spots.map((s) => [s.id, s.name]));
  const rows: WishRow[] = ranked
    .map((r, i) => {
      const p = plan.wishes[i];
      const bestFit = r.fits[0];
      return {
        plantKey: r.wish.plantKey,
        name: byKey.get(r.wish.plantKey)!.name,
        mustHave: r.wish.mustHave,
        pots: r.wish.pots,
        best: p.best
          ? {
              spot: spotName.get(p.best.spotId)!,
              verdict: p.best.verdict,
              likely: r.fits.find((f) => f.spotId === p.best!.spotId)?.likely ?? false,
              reason: bestFit?.reason ?? null,
            }
          : null,
        placed: p.placed
          ? { spot: spotName.get(p.placed.spotId)!, verdict: p.placed.verdict, reason: reasonIn(i, p.placed.spotId) }
          : null,
        note: p.note,
        everywhereStruggles: p.everywhereStruggles ?? false,
      };
    })
    .sort(
      (a, b) =>
        VERDICT_ORDER.indexOf(a.best?.verdict ?? "struggles here") -
          VERDICT_ORDER.indexOf(b.best?.verdict ?? "struggles here") || Number(b.mustHave) - Number(a.mustHave),
    );
  return {
    rows,
    spots: plan.spots.filter((s) => s.capacity > 0 || s.mustHavePots + s.otherPots > 0),
    choices: plants.filter((p) => !wishes.some((w) => w.plantKey === p.key)).map((p) => ({ key: p.key, name: p.name })),
    period: {
      chosen: choice.kind === "latest" ? "latest" : choice.month,
      months: pickableMonths(now, site.timeZone),
      problem: periodProblem,
      // A chosen period is the same for every spot; by default each spot has its own.
      judged:
        choice.kind === "ending"
          ? periodLabel(
              periods.values().next().value ?? { firstMonth: choice.month, lastMonth: choice.month, toToday: false },
            )
          : null,
      bySpot:
        choice.kind === "latest"
          ? spots.filter((s) => periods.has(s.id)).map((s) => `${s.name}: ${periodLabel(periods.get(s.id))}`)
          : [],
    },
  };
}
