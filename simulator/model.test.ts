import * as SunCalc from "suncalc";
import * as fc from "fast-check";
import { linearRegression, mean, median, quantile, rSquared, linearRegressionLine } from "simple-statistics";
import { describe, expect, it, vi } from "vitest";
import {
  DEMO_OUTDOOR_MONTHS,
  DEMO_SCENARIO,
  DEMO_SITE,
  DEMO_SPOTS,
  coldFrontScenario,
  generate,
  outdoorClimate,
  outdoorMonthExtremes,
  saturationVapourPressureHpa,
  type Scenario,
  type SimReading,
  type SimSite,
  type SimSpot,
  type SpotKind,
} from "./model";

const MINUTE = 60_000;
const HOUR = 3_600_000;
const DAY = 86_400_000;

const spotOf = (kind: SpotKind, facing: SimSpot["facing"] = "S"): SimSpot => ({ kind, facing, hasLight: true });

function run(
  spot: SimSpot,
  from: number,
  to: number,
  intervalMs: number,
  extra: { scenario?: Scenario; site?: SimSite; sensorSeed?: number; artifacts?: boolean } = {},
): SimReading[] {
  return [
    ...generate(extra.site ?? DEMO_SITE, spot, extra.scenario ?? DEMO_SCENARIO, {
      from: new Date(from),
      to: new Date(to),
      intervalMs,
      sensorSeed: extra.sensorSeed ?? 7,
      artifacts: extra.artifacts,
    }),
  ];
}

/** Wall-clock parts in a time zone, cached per UTC hour because Intl is slow per call. */
function localParts(timeZone: string): (t: number) => { month: number; day: number; hour: number } {
  const format = new Intl.DateTimeFormat("en-GB", {
    timeZone,
    month: "numeric",
    day: "numeric",
    hour: "numeric",
    hourCycle: "h23",
  });
  const cache = new Map<number, { month: number; day: number; hour: number }>();
  return (t) => {
    const key = Math.floor(t / HOUR);
    let parts = cache.get(key);
    if (parts === undefined) {
      const p = Object.fromEntries(format.formatToParts(new Date(key * HOUR)).map((x) => [x.type, Number(x.value)]));
      parts = { month: p.month, day: p.day, hour: p.hour };
      cache.set(key, parts);
    }
    return parts;
  };
}
const london = localParts(DEMO_SITE.timeZone);

const YEAR_FROM = Date.UTC(2025, 0, 1);
const YEAR_TO = Date.UTC(2026, 0, 1);
const yearCache = new Map<SpotKind, SimReading[]>();
/** A 2025 of the demo site at 15-minute steps, shared by the range checks. */
function demoYear(kind: SpotKind): SimReading[] {
  let readings = yearCache.get(kind);
  if (readings === undefined) {
    readings = run(spotOf(kind), YEAR_FROM, YEAR_TO, 15 * MINUTE);
    yearCache.set(kind, readings);
  }
  return readings;
}

const isWinter = (r: SimReading) => [12, 1, 2].includes(london(r.measuredAt.getTime()).month);
const isSummer = (r: SimReading) => [6, 7, 8].includes(london(r.measuredAt.getTime()).month);
const isNight = (r: SimReading) => london(r.measuredAt.getTime()).hour < 6;

describe("determinism", () => {
  const from = Date.UTC(2025, 2, 1);
  const to = from + 7 * DAY;

  it("gives identical readings for identical inputs", () => {
    for (const kind of ["outdoor", "windowsill", "bathroom", "heated-room", "room"] as const) {
      expect(run(spotOf(kind), from, to, 5 * MINUTE, { artifacts: true })).toEqual(
        run(spotOf(kind), from, to, 5 * MINUTE, { artifacts: true }),
      );
    }
  });

  it("never calls Math.random", () => {
    const random = vi.spyOn(Math, "random");
    run(spotOf("bathroom"), from, to, 5 * MINUTE, { artifacts: true });
    expect(random).not.toHaveBeenCalled();
    random.mockRestore();
  });

  it("depends on the instant, not on where a run starts, so overlapping runs agree", () => {
    const whole = run(spotOf("windowsill"), from, to, 5 * MINUTE);
    const tail = run(spotOf("windowsill"), from + 3 * DAY + 2 * MINUTE, to, 5 * MINUTE);
    const byTime = new Map(whole.map((r) => [r.measuredAt.getTime(), r]));
    expect(tail.length).toBeGreaterThan(800);
    for (const r of tail) {
      const same = byTime.get(r.measuredAt.getTime());
      expect({ ...r, battery: 0 }).toEqual({ ...same, battery: 0 });
    }
  });

  it("aligns samples to multiples of the interval", () => {
    const readings = run(spotOf("room"), from + 123_456, from + DAY, 5 * MINUTE);
    expect(readings.every((r) => r.measuredAt.getTime() % (5 * MINUTE) === 0)).toBe(true);
  });

  it("gives a different sensor its own noise over the same climate", () => {
    const a = run(spotOf("outdoor"), from, to, 5 * MINUTE, { sensorSeed: 1 });
    const b = run(spotOf("outdoor"), from, to, 5 * MINUTE, { sensorSeed: 2 });
    const bByTime = new Map(b.map((r) => [r.measuredAt.getTime(), r.temperature]));
    const diffs = a.flatMap((r) => {
      const other = bByTime.get(r.measuredAt.getTime());
      return other === undefined ? [] : [Math.abs(r.temperature - other)];
    });
    expect(diffs.some((d) => d > 0)).toBe(true);
    // Two sensors ±0.2 °C each, rounded to 0.1 °C, never disagree by more than 0.5 °C.
    expect(Math.max(...diffs)).toBeLessThanOrEqual(0.5);
  });
});

describe("reference formulas", () => {
  it("saturation vapour pressure matches the Magnus form check values", () => {
    // Alduchov & Eskridge (1996), J. Appl. Meteor. 35, 601–609: e_s(20 °C) = 23.33 hPa, e_s(0 °C) = 6.11 hPa.
    expect(saturationVapourPressureHpa(20)).toBeCloseTo(23.33, 2);
    expect(saturationVapourPressureHpa(0)).toBeCloseTo(6.11, 2);
  });

  it("noon sun elevation at 51.5° N on 20 June is 61.95°", () => {
    // 90° − |φ − δ| (Cooper 1969 declination); value computed in REFERENCES.md, suncalc agrees within 0.1°.
    const site: SimSite = { latitude: 51.5, longitude: 0, timeZone: "UTC" };
    const climate = outdoorClimate(site, DEMO_SCENARIO);
    const noon = SunCalc.getTimes(new Date(Date.UTC(2025, 5, 20, 12)), 51.5, 0).solarNoon;
    expect(climate(noon).sunElevation).toBeGreaterThan(61.95 - 0.3);
    expect(climate(noon).sunElevation).toBeLessThan(61.95 + 0.3);
  });

  it("cheap sun elevation stays within 1° of suncalc getPosition (reference library)", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -65, max: 65, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.integer({ min: Date.UTC(2020, 0, 1), max: Date.UTC(2030, 0, 1) }),
        (latitude, longitude, t) => {
          const climate = outdoorClimate({ latitude, longitude, timeZone: "UTC" }, DEMO_SCENARIO);
          const reference = SunCalc.getPosition(new Date(t), latitude, longitude).altitude;
          return Math.abs(climate(new Date(t)).sunElevation - reference) < 1;
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe("outdoor climate", () => {
  const flat: Scenario = { ...DEMO_SCENARIO, fronts: false };

  it("is coldest near sunrise and warmest in mid-afternoon", () => {
    const climate = outdoorClimate(DEMO_SITE, flat);
    for (const dayStart of [
      Date.UTC(2025, 0, 10),
      Date.UTC(2025, 3, 10),
      Date.UTC(2025, 6, 10),
      Date.UTC(2025, 9, 10),
    ]) {
      const times = SunCalc.getTimes(new Date(dayStart + 12 * HOUR), DEMO_SITE.latitude, DEMO_SITE.longitude);
      let coldest = { t: 0, v: Infinity };
      let warmest = { t: 0, v: -Infinity };
      for (let t = dayStart; t < dayStart + DAY; t += 5 * MINUTE) {
        const v = climate(new Date(t)).temperature;
        if (v < coldest.v) coldest = { t, v };
        if (v > warmest.v) warmest = { t, v };
      }
      // Parton & Logan (1981), Agric. Meteorol. 23, 205–216: minimum at sunrise, maximum ~1.5–2.5 h after noon.
      expect(Math.abs(coldest.t - times.sunrise!.getTime())).toBeLessThanOrEqual(30 * MINUTE);
      const afterNoon = warmest.t - times.solarNoon.getTime();
      expect(afterNoon).toBeGreaterThan(HOUR);
      expect(afterNoon).toBeLessThan(3 * HOUR);
    }
  });

  it("holds humidity within 20–100 % and raises it at night as the air cools", () => {
    const readings = demoYear("outdoor");
    expect(Math.min(...readings.map((r) => r.humidity))).toBeGreaterThanOrEqual(20);
    expect(Math.max(...readings.map((r) => r.humidity))).toBeLessThanOrEqual(100);
    const july = readings.filter((r) => london(r.measuredAt.getTime()).month === 7);
    const at = (hour: number) =>
      mean(july.filter((r) => london(r.measuredAt.getTime()).hour === hour).map((r) => r.humidity));
    expect(at(5)).toBeGreaterThan(at(15) + 15);
  });

  it("goes below freezing on winter nights", () => {
    expect(
      Math.min(
        ...demoYear("outdoor")
          .filter(isWinter)
          .map((r) => r.temperature),
      ),
    ).toBeLessThan(0);
  });

  it("gives the demo site a temperate profile", () => {
    const months = outdoorMonthExtremes(DEMO_SITE, DEMO_SCENARIO, 2025);
    // Met Office 1991–2020 averages for lowland Gloucestershire (memory): January mean daily
    // minimum ~1.5 °C, July mean daily maximum ~22.5 °C.
    expect(months[0].meanDailyLow).toBeGreaterThan(-1);
    expect(months[0].meanDailyLow).toBeLessThan(3.5);
    expect(months[6].meanDailyHigh).toBeGreaterThan(20);
    expect(months[6].meanDailyHigh).toBeLessThan(25);
    // The brief for the demo: coldest nights −4 to −6 °C, hot days 28–31 °C.
    const lowest = Math.min(...months.map((m) => m.lowest));
    const highest = Math.max(...months.map((m) => m.highest));
    expect(lowest).toBeGreaterThanOrEqual(-6.5);
    expect(lowest).toBeLessThanOrEqual(-3.5);
    expect(highest).toBeGreaterThanOrEqual(27.5);
    expect(highest).toBeLessThanOrEqual(31.5);
  });

  it("keeps every year 2022–2030 inside the documented monthly ranges", () => {
    for (let year = 2022; year <= 2030; year++) {
      outdoorMonthExtremes(DEMO_SITE, DEMO_SCENARIO, year).forEach((m, i) => {
        const doc = DEMO_OUTDOOR_MONTHS[i];
        expect(m.lowest, `${year}-${m.month} lowest`).toBeGreaterThanOrEqual(doc.lowest[0]);
        expect(m.lowest, `${year}-${m.month} lowest`).toBeLessThanOrEqual(doc.lowest[1]);
        expect(m.highest, `${year}-${m.month} highest`).toBeGreaterThanOrEqual(doc.highest[0]);
        expect(m.highest, `${year}-${m.month} highest`).toBeLessThanOrEqual(doc.highest[1]);
      });
    }
  });

  it("produces sensor readings whose monthly lows and highs match the documented ranges", () => {
    const readings = demoYear("outdoor");
    for (const doc of DEMO_OUTDOOR_MONTHS) {
      const temps = readings
        .filter((r) => london(r.measuredAt.getTime()).month === doc.month)
        .map((r) => r.temperature);
      // Sensor noise is at most ±0.2 °C plus rounding, so 0.3 °C of slack around the noise-free range.
      expect(Math.min(...temps)).toBeGreaterThanOrEqual(doc.lowest[0] - 0.3);
      expect(Math.min(...temps)).toBeLessThanOrEqual(doc.lowest[1] + 0.3);
      expect(Math.max(...temps)).toBeGreaterThanOrEqual(doc.highest[0] - 0.3);
      expect(Math.max(...temps)).toBeLessThanOrEqual(doc.highest[1] + 0.3);
    }
  });

  it("brings multi-day cold snaps and heat waves", () => {
    const climate = outdoorClimate(DEMO_SITE, DEMO_SCENARIO);
    const dailyMeans: number[] = [];
    for (let d = YEAR_FROM; d < YEAR_TO; d += DAY) {
      const temps: number[] = [];
      for (let t = d; t < d + DAY; t += HOUR) temps.push(climate(new Date(t)).temperature);
      dailyMeans.push(mean(temps));
    }
    const flatClimate = outdoorClimate(DEMO_SITE, flat);
    const anomalies = dailyMeans.map((m, i) => {
      const temps: number[] = [];
      for (let t = YEAR_FROM + i * DAY; t < YEAR_FROM + (i + 1) * DAY; t += HOUR)
        temps.push(flatClimate(new Date(t)).temperature);
      return m - mean(temps);
    });
    // A spell: three or more days in a row over 3 °C off the climatology.
    const spells = (sign: 1 | -1) => {
      let count = 0;
      let run = 0;
      for (const a of anomalies) {
        run = sign * a > 3 ? run + 1 : 0;
        if (run === 3) count++;
      }
      return count;
    };
    expect(spells(-1)).toBeGreaterThanOrEqual(3);
    expect(spells(1)).toBeGreaterThanOrEqual(3);
  });
});

describe("southern hemisphere", () => {
  const site: SimSite = { latitude: -33.9, longitude: 18.5, timeZone: "Africa/Johannesburg" };

  it("flips the seasons: July is the cold month", () => {
    const months = outdoorMonthExtremes(site, DEMO_SCENARIO, 2025);
    const meanOf = (i: number) => (months[i].meanDailyLow + months[i].meanDailyHigh) / 2;
    expect(meanOf(6)).toBeLessThan(meanOf(0) - 8);
    const coldest = months.reduce((a, b) => (a.meanDailyLow < b.meanDailyLow ? a : b));
    expect([6, 7, 8]).toContain(coldest.month);
  });

  it("has its long days and high sun in December", () => {
    const climate = outdoorClimate(site, DEMO_SCENARIO);
    const noonElevation = (month: number) =>
      climate(SunCalc.getTimes(new Date(Date.UTC(2025, month, 21, 12)), site.latitude, site.longitude).solarNoon)
        .sunElevation;
    expect(noonElevation(11)).toBeGreaterThan(noonElevation(5) + 40);
  });
});

describe("indoor spots", () => {
  it("heated room stays at or above 16 °C on winter nights", () => {
    const nights = demoYear("heated-room").filter((r) => isWinter(r) && isNight(r));
    expect(nights.length).toBeGreaterThan(1500);
    expect(Math.min(...nights.map((r) => r.temperature))).toBeGreaterThanOrEqual(16);
  });

  it("heated room runs dry in winter (30–40 % RH is what growers report; common practice)", () => {
    const winter = demoYear("heated-room")
      .filter(isWinter)
      .map((r) => r.humidity);
    expect(mean(winter)).toBeLessThan(45);
    expect(median(winter)).toBeGreaterThanOrEqual(30);
    expect(median(winter)).toBeLessThanOrEqual(42);
  });

  it("heated room follows the weather in summer when the heating is off", () => {
    const summer = demoYear("heated-room")
      .filter(isSummer)
      .map((r) => r.temperature);
    expect(mean(summer)).toBeGreaterThan(20);
    expect(Math.max(...summer) - Math.min(...summer)).toBeGreaterThan(6);
  });

  it("windowsill nights are colder than the room's", () => {
    for (const season of [isWinter, isSummer]) {
      const sill = demoYear("windowsill")
        .filter((r) => season(r) && isNight(r))
        .map((r) => r.temperature);
      const room = demoYear("room")
        .filter((r) => season(r) && isNight(r))
        .map((r) => r.temperature);
      const heated = demoYear("heated-room")
        .filter((r) => season(r) && isNight(r))
        .map((r) => r.temperature);
      expect(mean(sill)).toBeLessThan(mean(room) - 1);
      expect(mean(sill)).toBeLessThan(mean(heated) - 2);
    }
  });

  it("windowsill warms in sun by facing", () => {
    const from = Date.UTC(2025, 0, 1);
    const to = Date.UTC(2025, 1, 1);
    const middayMax = (facing: SimSpot["facing"]) =>
      quantile(
        run(spotOf("windowsill", facing), from, to, 15 * MINUTE)
          .filter((r) => {
            const h = london(r.measuredAt.getTime()).hour;
            return h >= 11 && h < 14;
          })
          .map((r) => r.temperature),
        0.9,
      );
    expect(middayMax("S")).toBeGreaterThan(middayMax("N") + 2);
  });

  it("bathroom has morning and evening shower spikes to 85–95 % RH", () => {
    const from = Date.UTC(2025, 0, 1);
    const readings = run({ kind: "bathroom", facing: "N", hasLight: false }, from, from + 31 * DAY, 5 * MINUTE);
    const byDay = new Map<number, SimReading[]>();
    for (const r of readings) {
      const key = london(r.measuredAt.getTime()).day;
      byDay.set(key, [...(byDay.get(key) ?? []), r]);
    }
    let spikeDays = 0;
    for (const day of byDay.values()) {
      const top = day.reduce((a, b) => (b.humidity > a.humidity ? b : a));
      if (top.humidity < 80) continue;
      spikeDays++;
      expect(top.humidity).toBeLessThanOrEqual(98);
      const hour = london(top.measuredAt.getTime()).hour;
      expect((hour >= 6 && hour < 10) || hour >= 19).toBe(true);
    }
    expect(spikeDays).toBeGreaterThanOrEqual(25);
    expect(median(readings.map((r) => r.humidity))).toBeLessThan(70);
    expect(readings.some((r) => r.lux !== undefined)).toBe(false);
  });
});

describe("light", () => {
  it("is dark at night and ~80–100 klux in clear midsummer sun outdoors", () => {
    const readings = demoYear("outdoor");
    const nights = readings.filter((r) => {
      const h = london(r.measuredAt.getTime()).hour;
      return h >= 1 && h < 3;
    });
    expect(Math.max(...nights.map((r) => r.lux ?? -1))).toBe(0);
    const june = readings.filter((r) => london(r.measuredAt.getTime()).month === 6).map((r) => r.lux ?? 0);
    // Clear-sky midsummer illuminance ~100 klux (memory; Thimijan & Heins 1983 give sunlight ≈ 54 lux per µmol m⁻² s⁻¹).
    expect(Math.max(...june)).toBeGreaterThan(80_000);
    expect(Math.max(...june)).toBeLessThan(105_000);
  });

  it("gives a south window 5–30 klux of direct sun and a north window only diffuse light", () => {
    const from = Date.UTC(2025, 0, 1);
    const to = Date.UTC(2025, 2, 1);
    const south = run(spotOf("windowsill", "S"), from, to, 15 * MINUTE).map((r) => r.lux ?? 0);
    const north = run(spotOf("windowsill", "N"), from, to, 15 * MINUTE).map((r) => r.lux ?? 0);
    expect(Math.max(...south)).toBeGreaterThan(5_000);
    expect(Math.max(...south)).toBeLessThan(30_000);
    expect(Math.max(...north)).toBeGreaterThan(700);
    expect(Math.max(...north)).toBeLessThan(3_000);
  });
});

describe("cold front scenario", () => {
  const start = new Date(Date.UTC(2025, 9, 14, 18));
  const scenario = coldFrontScenario(start);

  it("falls steadily from ~12 °C to ~3 °C over 3 hours, crossing 8 °C on the way down", () => {
    const climate = outdoorClimate(DEMO_SITE, scenario);
    const fall: { x: number; y: number }[] = [];
    for (let t = start.getTime(); t <= start.getTime() + 3 * HOUR; t += 5 * MINUTE) {
      fall.push({ x: (t - start.getTime()) / HOUR, y: climate(new Date(t)).temperature });
    }
    expect(fall[0].y).toBeGreaterThan(11);
    expect(fall[0].y).toBeLessThan(13);
    expect(fall[fall.length - 1].y).toBeGreaterThan(2);
    expect(fall[fall.length - 1].y).toBeLessThan(4);
    for (let i = 1; i < fall.length; i++) expect(fall[i].y).toBeLessThan(fall[i - 1].y);
    const points = fall.map((p): [number, number] => [p.x, p.y]);
    const fit = linearRegression(points);
    expect(fit.m).toBeCloseTo(-3, 1);
    expect(rSquared(points, linearRegressionLine(fit))).toBeGreaterThan(0.999);
  });

  it("stays below 6 °C for about 4 hours and then recovers", () => {
    const climate = outdoorClimate(DEMO_SITE, scenario);
    let below = 0;
    for (let t = start.getTime() - HOUR; t < start.getTime() + 12 * HOUR; t += MINUTE) {
      if (climate(new Date(t)).temperature < 6) below += MINUTE;
    }
    expect(below / HOUR).toBeGreaterThan(3.5);
    expect(below / HOUR).toBeLessThan(4.5);
    expect(climate(new Date(start.getTime() + 9 * HOUR)).temperature).toBeGreaterThan(11);
  });

  it("shows the same steady fall in sensor readings", () => {
    const readings = run(
      spotOf("outdoor", "none"),
      start.getTime() - 6 * HOUR,
      start.getTime() + 12 * HOUR,
      5 * MINUTE,
      {
        scenario,
        sensorSeed: 3,
      },
    );
    const firstBelow = readings.findIndex((r) => r.temperature < 8);
    const crossing = readings[firstBelow];
    expect(crossing.measuredAt.getTime()).toBeGreaterThan(start.getTime());
    expect(crossing.measuredAt.getTime()).toBeLessThan(start.getTime() + 2 * HOUR);
    const hourBefore = readings.filter(
      (r) => r.measuredAt.getTime() >= crossing.measuredAt.getTime() - HOUR && r.measuredAt < crossing.measuredAt,
    );
    const points = hourBefore.map((r): [number, number] => [r.measuredAt.getTime() / HOUR, r.temperature]);
    if (points.length >= 4) expect(linearRegression(points).m).toBeLessThan(-2);
  });

  it("leaves the rest of the day to the flat climate", () => {
    const climate = outdoorClimate(DEMO_SITE, scenario);
    const before = climate(new Date(start.getTime() - 6 * HOUR)).temperature;
    expect(before).toBeGreaterThan(11);
    expect(before).toBeLessThan(13);
  });
});

describe("sensor behaviour", () => {
  it("drops out now and then for 10 minutes to 3 hours", () => {
    const readings = demoYear("room");
    const gaps: number[] = [];
    for (let i = 1; i < readings.length; i++) {
      const gap = readings[i].measuredAt.getTime() - readings[i - 1].measuredAt.getTime();
      if (gap > 15 * MINUTE) gaps.push(gap);
    }
    expect(gaps.length).toBeGreaterThan(10);
    expect(gaps.length).toBeLessThan(100);
    // A gap can span two overlapping drop-outs, so allow a little over 3 h plus one interval.
    expect(Math.max(...gaps)).toBeLessThanOrEqual(4 * HOUR + 15 * MINUTE);
    expect(readings.length).toBeGreaterThan(0.97 * 365 * 96);
  });

  it("drains the battery from 100 % over roughly a year", () => {
    const readings = demoYear("room");
    expect(readings[0].battery).toBe(100);
    for (let i = 1; i < readings.length; i++) expect(readings[i].battery).toBeLessThanOrEqual(readings[i - 1].battery);
    const last = readings[readings.length - 1].battery;
    expect(last).toBeGreaterThanOrEqual(5);
    expect(last).toBeLessThanOrEqual(30);
  });

  it("sends duplicates and out-of-order readings only when artifacts are asked for", () => {
    const from = Date.UTC(2025, 3, 1);
    const to = from + 30 * DAY;
    const clean = run(spotOf("windowsill"), from, to, 5 * MINUTE);
    for (let i = 1; i < clean.length; i++) expect(clean[i].measuredAt > clean[i - 1].measuredAt).toBe(true);

    const live = run(spotOf("windowsill"), from, to, 5 * MINUTE, { artifacts: true });
    let duplicates = 0;
    let backwards = 0;
    for (let i = 1; i < live.length; i++) {
      const dt = live[i].measuredAt.getTime() - live[i - 1].measuredAt.getTime();
      if (dt === 0) {
        duplicates++;
        expect(live[i]).toEqual(live[i - 1]);
        expect(live[i]).not.toBe(live[i - 1]);
      }
      if (dt < 0) {
        backwards++;
        expect(dt).toBe(-5 * MINUTE);
      }
    }
    expect(duplicates).toBeGreaterThan(5);
    expect(backwards).toBeGreaterThan(5);
    // Nothing invented or lost: the distinct readings are the clean stream.
    const distinct = new Map(live.map((r) => [r.measuredAt.getTime(), r]));
    expect([...distinct.values()].sort((a, b) => a.measuredAt.getTime() - b.measuredAt.getTime())).toEqual(clean);
  });

  it("reports lux only for spots with a light channel", () => {
    const from = Date.UTC(2025, 5, 1);
    const withLight = run(spotOf("room"), from, from + DAY, 5 * MINUTE);
    const without = run({ kind: "room", facing: "S", hasLight: false }, from, from + DAY, 5 * MINUTE);
    expect(withLight.every((r) => typeof r.lux === "number")).toBe(true);
    expect(without.every((r) => !("lux" in r))).toBe(true);
  });

  it("rejects an impossible interval or site", () => {
    const opts = { from: new Date(0), to: new Date(DAY), intervalMs: 0, sensorSeed: 1 };
    expect(() => generate(DEMO_SITE, spotOf("room"), DEMO_SCENARIO, opts).next()).toThrow(RangeError);
    expect(() => outdoorClimate({ latitude: 95, longitude: 0, timeZone: "UTC" }, DEMO_SCENARIO)).toThrow(RangeError);
  });
});

describe("speed", () => {
  it("generates a year at 5-minute steps for the five demo spots", () => {
    const started = performance.now();
    let count = 0;
    for (const spot of DEMO_SPOTS) {
      for (const _ of generate(DEMO_SITE, spot, DEMO_SCENARIO, {
        from: new Date(YEAR_FROM),
        to: new Date(YEAR_TO),
        intervalMs: 5 * MINUTE,
        sensorSeed: spot.sensorSeed,
      })) {
        count++;
      }
    }
    console.log(`simulator: ${count} readings in ${Math.round(performance.now() - started)} ms`);
    expect(count).toBeGreaterThan(500_000);
  });
});
