import { describe, expect, it } from "vitest";
import { planWishlist, type Wish, type WishSpot } from "~/domain/fit/wishlist";

// Our own planning rule (no outside source): must-haves take room first, each in its best-fitting
// spot with room; a spot with capacity 0 has no stated limit.
const spots: WishSpot[] = [
  { id: 1, name: "Spare room", capacity: 4, standingPots: 2 },
  { id: 2, name: "Kitchen sill", capacity: 3, standingPots: 0 },
  { id: 3, name: "Hall table", capacity: 0, standingPots: 5 },
];
const wish = (plantKey: string, mustHave: boolean, pots: number, fits: Wish["fits"]): Wish => ({
  plantKey,
  mustHave,
  pots,
  fits,
});

describe("planWishlist", () => {
  it("places must-haves first and reports a spot they fill", () => {
    const plan = planWishlist(spots, [
      wish("a", false, 1, [
        { spotId: 1, verdict: "thrives here" },
        { spotId: 2, verdict: "possible with care" },
      ]),
      wish("b", true, 2, [{ spotId: 1, verdict: "thrives here" }]),
    ]);
    expect(plan.wishes[1]).toMatchObject({ placed: { spotId: 1 }, note: null });
    // The ordinary wish comes after the must-have: the spare room is full, so the kitchen sill.
    expect(plan.wishes[0].placed?.spotId).toBe(2);
    expect(plan.wishes[0].note).toBe("Spare room has no room left; next best with room: Kitchen sill.");
    const spare = plan.spots.find((s) => s.id === 1)!;
    expect(spare).toMatchObject({ mustHavePots: 2, free: 0, filledByMustHaves: true });
  });

  it("does not place a plant where it struggles, and treats capacity 0 as no limit", () => {
    const plan = planWishlist(spots, [
      wish("c", true, 1, [{ spotId: 2, verdict: "struggles here" }]),
      wish("d", false, 20, [{ spotId: 3, verdict: "not enough data yet" }]),
    ]);
    expect(plan.wishes[0]).toMatchObject({
      placed: null,
      note: "It struggles in every spot here (1 judged).",
      everywhereStruggles: true,
    });
    expect(plan.wishes[1].placed?.spotId).toBe(3);
    expect(plan.spots.find((s) => s.id === 3)!.free).toBeNull();
  });

  it("does not make a home of a spot that suits it for part of the year only (a summer bench)", () => {
    const plan = planWishlist(spots, [
      wish("f", true, 1, [
        { spotId: 3, verdict: "good for part of the year" },
        { spotId: 2, verdict: "struggles here" },
      ]),
    ]);
    expect(plan.wishes[0]).toMatchObject({
      placed: null,
      best: { spotId: 3 },
      note: "No spot suits it all year; the best suits it for part of the year.",
    });
  });

  it("says when no suitable spot has room", () => {
    const plan = planWishlist(spots, [
      wish("e", true, 5, [
        { spotId: 2, verdict: "thrives here" },
        { spotId: 1, verdict: "possible with care" },
      ]),
    ]);
    expect(plan.wishes[0]).toMatchObject({
      placed: null,
      note: "No room left in a spot that suits it (Kitchen sill has no room left).",
    });
  });
});
