import { describe, expect, it } from "vitest";
import { gistOf, groupFits } from "~/domain/fit/summary";

const fit = (name: string, verdict: string, ...rules: string[]) => ({
  name,
  verdict,
  reasons: rules.map((rule) => ({ rule })),
});

describe("grouping a spot's fits after the top few (issue 17)", () => {
  it("gathers the rest by verdict and the gist of their first reason, best verdict first, biggest group first", () => {
    const fits = [
      fit("Hoya", "possible with care", "light"),
      fit("Begonia", "possible with care", "humidity"),
      fit("Ludisia", "possible with care", "humidity"),
      fit("Phalaenopsis", "struggles here", "cold-nights", "humidity"),
      fit("Vanda", "struggles here", "cold-nights"),
      fit("Paphiopedilum", "struggles here", "cold-nights"),
      fit("Masdevallia", "struggles here", "hot-days"),
      fit("Cymbidium", "good for part of the year", "seasonal", "cold-nights"),
    ];
    expect(groupFits(fits, 1)).toEqual([
      { verdict: "possible with care", gist: "air too dry or too damp for them", names: ["Begonia", "Ludisia"] },
      { verdict: "good for part of the year", gist: "nights below their minimum", names: ["Cymbidium"] },
      {
        verdict: "struggles here",
        gist: "nights below their minimum",
        names: ["Phalaenopsis", "Vanda", "Paphiopedilum"],
      },
      { verdict: "struggles here", gist: "days above their maximum", names: ["Masdevallia"] },
    ]);
  });

  it("names a fit with no reason by what it lacks, and every fit lands in exactly one group", () => {
    expect(gistOf(fit("A", "not enough data yet"))).toBe("months still without enough readings");
    expect(gistOf(fit("B", "thrives here"))).toBe("nothing asks for care");
    expect(gistOf(fit("C", "good for part of the year", "seasonal"))).toBe("good only for a run of months");
    const fits = Array.from({ length: 25 }, (_, i) =>
      fit(`G${i}`, i % 2 ? "struggles here" : "possible with care", i % 3 ? "cold-nights" : "light"),
    );
    const groups = groupFits(fits, 3);
    expect(groups.flatMap((g) => g.names).sort()).toEqual(
      fits
        .slice(3)
        .map((f) => f.name)
        .sort(),
    );
  });
});
