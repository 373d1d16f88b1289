// Wishlist planning: each wanted plant gets its best-fitting spot, and spot capacity (pots) is
// shared out so the grower sees when must-haves already fill a spot. Pure: fits are computed by the
// caller (fitPlant / rankSpotsForPlant) and passed in.
import { VERDICT_ORDER, type Verdict } from "~/domain/fit/verdict";

export type WishSpot = {
  id: number;
  name: string;
  /** Pots that fit; 0 means the grower has not said, and is treated as no limit. */
  capacity: number;
  /** Pots standing there now (the inventory). */
  standingPots: number;
};

export type Wish = {
  plantKey: string;
  mustHave: boolean;
  pots: number;
  /** Fits of this plant to each spot, best first. */
  fits: { spotId: number; verdict: Verdict }[];
};

export type WishPlan = {
  plantKey: string;
  best: { spotId: number; verdict: Verdict } | null;
  /** The spot the plan puts it in: the best spot that fits and still has room. */
  placed: { spotId: number; verdict: Verdict } | null;
  /** Why it was not placed in its best spot, in plain words; null when it was. */
  note: string | null;
  /** Even the best spot is "struggles here": the page says so once, with no "best spot". */
  everywhereStruggles?: boolean;
};

export type SpotRoom = WishSpot & {
  mustHavePots: number;
  otherPots: number;
  free: number | null;
  filledByMustHaves: boolean;
};

/** One wished plant as the wishlist shows it: its best spot, where the plan puts it, and why. */
export type WishRow = {
  plantKey: string;
  name: string;
  mustHave: boolean;
  pots: number;
  /** "likely" when the verdict leans on projected months rather than measured ones. */
  best: { spot: string; verdict: Verdict; likely: boolean; reason: string | null } | null;
  placed: { spot: string; verdict: Verdict; reason: string | null } | null;
  note: string | null;
  everywhereStruggles: boolean;
};

/**
 * A plant can stand in a spot when the verdict is not "struggles here" nor "good for part of the
 * year" (a summer bench is no home for the winter). "Not enough data yet" counts, with its caveat shown.
 */
const usable = (v: Verdict) => v !== "struggles here" && v !== "good for part of the year";

export function planWishlist(spots: WishSpot[], wishes: Wish[]): { wishes: WishPlan[]; spots: SpotRoom[] } {
  const room = new Map(spots.map((s) => [s.id, { ...s, mustHavePots: 0, otherPots: 0 }]));
  const freeIn = (id: number) => {
    const s = room.get(id)!;
    return s.capacity === 0 ? Infinity : s.capacity - s.standingPots - s.mustHavePots - s.otherPots;
  };
  const name = (id: number) => room.get(id)?.name ?? "that spot";
  // Must-haves take room first; within each group the grower's order stands.
  const order = [...wishes.keys()].sort((a, b) => Number(wishes[b].mustHave) - Number(wishes[a].mustHave) || a - b);
  const plans: WishPlan[] = new Array(wishes.length);
  for (const i of order) {
    const w = wishes[i];
    const fits = [...w.fits]
      .filter((f) => room.has(f.spotId))
      .sort((a, b) => VERDICT_ORDER.indexOf(a.verdict) - VERDICT_ORDER.indexOf(b.verdict));
    const best = fits[0] ?? null;
    if (!best || !usable(best.verdict)) {
      plans[i] = {
        plantKey: w.plantKey,
        best,
        placed: null,
        note: !best
          ? "No spots to judge yet."
          : best.verdict === "good for part of the year"
            ? "No spot suits it all year; the best suits it for part of the year."
            : best.verdict === "struggles here"
              ? `It struggles in every spot here (${fits.length} judged).`
              : "No spot suits it yet.",
        everywhereStruggles: best?.verdict === "struggles here",
      };
      continue;
    }
    const placed = fits.find((f) => usable(f.verdict) && freeIn(f.spotId) >= w.pots) ?? null;
    if (placed) {
      const r = room.get(placed.spotId)!;
      if (w.mustHave) r.mustHavePots += w.pots;
      else r.otherPots += w.pots;
    }
    plans[i] = {
      plantKey: w.plantKey,
      best,
      placed,
      note:
        placed?.spotId === best.spotId
          ? null
          : placed
            ? `${name(best.spotId)} has no room left; next best with room: ${name(placed.spotId)}.`
            : `No room left in a spot that suits it (${name(best.spotId)} has no room left).`,
    };
  }
  return {
    wishes: plans,
    spots: [...room.values()].map((s) => {
      const free = s.capacity === 0 ? null : s.capacity - s.standingPots - s.mustHavePots - s.otherPots;
      return {
        ...s,
        free,
        filledByMustHaves: s.capacity > 0 && s.mustHavePots > 0 && s.capacity - s.standingPots - s.mustHavePots <= 0,
      };
    }),
  };
}
