import { describe, expect, it } from "vitest";
import {
  CATEGORY_NIGHTS,
  DLI_BANDS,
  PLANT_LIBRARY,
  SOURCED_FIELDS,
  categoryForNight,
  plantByKey,
} from "~/domain/plants/library";

describe("plant library", () => {
  it("holds at least 22 profiles with unique keys", () => {
    expect(PLANT_LIBRARY.length).toBeGreaterThanOrEqual(22);
    expect(new Set(PLANT_LIBRARY.map((p) => p.key)).size).toBe(PLANT_LIBRARY.length);
  });

  it("covers the groups hobby growers keep", () => {
    const names = PLANT_LIBRARY.map((p) => p.name).join(" | ");
    for (const genus of [
      "Phalaenopsis",
      "Paphiopedilum",
      "Cattleya",
      "Oncidium",
      "Cymbidium",
      "Dendrobium",
      "Vanda",
      "Miltoniopsis",
      "Masdevallia",
      "Zygopetalum",
      "Coelogyne",
      "Ludisia",
      "Pleione",
      "Encyclia",
      "Prosthechea",
      "Brassavola",
      "Neofinetia",
      "Tillandsia",
      "Anthurium",
      "Begonia",
      "Hoya",
      "Nepenthes",
      "Calathea",
      "Goeppertia",
    ]) {
      expect(names).toContain(genus);
    }
    expect(PLANT_LIBRARY.filter((p) => p.name.startsWith("Paphiopedilum"))).toHaveLength(2);
    expect(PLANT_LIBRARY.filter((p) => p.name.startsWith("Dendrobium"))).toHaveLength(2);
    expect(PLANT_LIBRARY.filter((p) => p.name.startsWith("Nepenthes"))).toHaveLength(2);
  });

  it("puts each group in the category its lowest safe night implies", () => {
    // Category nights: Frowine, Orchids for Dummies, table 2-1, and AOS culture guidance —
    // cool 7–13 °C, intermediate 13–16 °C, warm 16–18 °C and above (REFERENCES.md).
    expect(CATEGORY_NIGHTS.cool).toEqual({ fromC: 7, toC: 13 });
    expect(CATEGORY_NIGHTS.intermediate).toEqual({ fromC: 13, toC: 16 });
    expect(CATEGORY_NIGHTS.warm.fromC).toBe(16);
    for (const p of PLANT_LIBRARY) expect([p.key, p.category]).toEqual([p.key, categoryForNight(p.minNightC)]);
    expect(categoryForNight(12.9)).toBe("cool");
    expect(categoryForNight(13)).toBe("intermediate");
    expect(categoryForNight(16)).toBe("warm");
  });

  it("has consistent bands", () => {
    for (const p of PLANT_LIBRARY) {
      expect(p.minNightC, p.key).toBeLessThan(p.maxDayC);
      expect(p.humidityMin, p.key).toBeLessThan(p.humidityMax);
      expect(p.humidityMax, p.key).toBeLessThanOrEqual(100);
      expect(p.dliMin, p.key).toBeLessThan(p.dliMax);
      expect(p.summary.length, p.key).toBeGreaterThan(20);
      expect(p.coldTolerance, p.key).toMatch(/°C/);
    }
    // Light classes don't overlap in order: every low-light group starts darker than every high-light one.
    const lows = PLANT_LIBRARY.filter((p) => p.light === "low").map((p) => p.dliMax);
    const highs = PLANT_LIBRARY.filter((p) => p.light === "high").map((p) => p.dliMin);
    expect(Math.max(...lows)).toBeLessThanOrEqual(Math.min(...highs));
  });

  it("names a source for every value, or marks it as memory", () => {
    for (const p of PLANT_LIBRARY) {
      const fields = p.sources.map((s) => s.field);
      for (const f of SOURCED_FIELDS) expect(fields, `${p.key}: ${f}`).toContain(f);
      for (const s of p.sources) expect(s.source.length).toBeGreaterThan(5);
    }
  });

  it("keeps the published anchors", () => {
    // Blanchard & Runkle (2006), J. Exp. Bot. 57: Phalaenopsis spiked at 23 °C days, not at 29 °C.
    const phal = plantByKey("phalaenopsis")!;
    expect(phal.flowering.coolPeriod!.maxDayC).toBeGreaterThanOrEqual(23);
    expect(phal.flowering.coolPeriod!.maxDayC).toBeLessThan(29);
    // AOS Phalaenopsis sheet: nights above 60 °F (15.6 °C), humidity 50–80 %.
    expect(phal.minNightC).toBeGreaterThanOrEqual(15.5);
    expect([phal.humidityMin, phal.humidityMax]).toEqual([50, 80]);
    // AOS Cymbidium sheet: autumn nights 50–60 °F (10–16 °C) initiate spikes; we ask for ≤ 13 °C.
    const cym = plantByKey("cymbidium")!.flowering.coolPeriod!;
    expect(cym.maxNightC).toBeGreaterThanOrEqual(10);
    expect(cym.maxNightC).toBeLessThanOrEqual(16);
    // AOS Cattleya sheet: 15–20 °F (8.3–11.1 °C) day–night differential.
    expect(plantByKey("cattleya")!.flowering.difC).toBeGreaterThanOrEqual(8);
    // Reid (1991): chilling injury below 7–10 °C, so warm groups keep safe nights above 10 °C.
    for (const p of PLANT_LIBRARY.filter((q) => q.category === "warm")) expect(p.minNightC).toBeGreaterThan(10);
  });
});

describe("plant library: two lines per limit (issue 15)", () => {
  it("gives every group a damage line beyond its comfort range, with a source", () => {
    for (const p of PLANT_LIBRARY) {
      expect(p.damageNightC, p.key).toBeLessThan(p.minNightC);
      expect(p.damageDayC, p.key).toBeGreaterThan(p.maxDayC);
      if (p.maxNightC !== undefined) expect(p.maxNightC, p.key).toBeGreaterThan(p.minNightC);
      expect(
        p.sources.some((s) => s.field.startsWith("damageNightC")),
        p.key,
      ).toBe(true);
    }
  });

  it("keeps each group's DLI range inside its light class band, and says so in the source", () => {
    for (const p of PLANT_LIBRARY) {
      const band = DLI_BANDS[p.light];
      expect(p.dliMin, p.key).toBeGreaterThanOrEqual(band.min);
      expect(p.dliMax, p.key).toBeLessThanOrEqual(band.max);
      expect(p.sources.find((s) => s.field === "dliMin/dliMax")?.source, p.key).toContain(`${band.min}–${band.max}`);
    }
  });

  it("has Odontoglossum as a cool grower, and Masdevallia's warm-night and heat lines", () => {
    const odm = plantByKey("odontoglossum")!;
    expect(odm).toMatchObject({ category: "cool" });
    expect(odm.maxDayC).toBeLessThanOrEqual(24);
    expect(plantByKey("oncidium")!.name).not.toContain("Odontoglossum");
    expect(plantByKey("masdevallia")).toMatchObject({ maxNightC: 16, damageDayC: 27 });
  });

  it("no longer contradicts itself on Maudiae's cold line", () => {
    const maudiae = plantByKey("paphiopedilum-mottled")!;
    expect(maudiae.coldTolerance).not.toMatch(/sulks below 13/);
    expect(maudiae.damageNightC).toBeLessThan(13);
  });

  it("cues flowering in season: Cymbidium late summer–autumn, nobile Dendrobium a dry winter rest, Phalaenopsis by days alone", () => {
    expect(plantByKey("cymbidium")!.flowering.coolPeriod!.cueMonths).toEqual([8, 9, 10, 11]);
    expect(plantByKey("dendrobium-nobile")!.flowering.coolPeriod).toMatchObject({ dryRest: true });
    expect(plantByKey("phalaenopsis")!.flowering.coolPeriod).toMatchObject({ maxDayC: 26 });
    expect(plantByKey("phalaenopsis")!.flowering.coolPeriod!.maxNightC).toBeUndefined();
  });
});
