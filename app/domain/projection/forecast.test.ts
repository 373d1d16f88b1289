// The forecast through a spot's model: the demo bench, fitted on two weeks, sees the forecast front
// of start:cold-front (forecastColdFront: the air 8 °C down for a night) coming.
import { describe, expect, it } from "vitest";
import type { HourlyRollup } from "~/domain/season/types";
import { DEMO_SCENARIO, DEMO_SITE, forecastColdFront, generate, outdoorWeather } from "../../../simulator/model";
import { WEATHER_VARIABLES } from "../../../simulator/weather-fake";
import { forecastSpot, RADIATIVE_FROST } from "./forecast";
import { drivers } from "~/domain/projection/drivers";
import { fitResponse } from "~/domain/projection/response";

const HOUR = 3_600_000;
const DAY = 86_400_000;
const NOW = Date.UTC(2025, 11, 10, 9);
const front = forecastColdFront(NOW);
const scenario = { ...DEMO_SCENARIO, coldFront: front };
const BENCH = { kind: "outdoor", facing: "none", hasLight: false } as const;

function weather(overrideNight?: { cloud: number; wind: number }) {
  const start = NOW - 20 * DAY;
  const n = (23 * DAY) / HOUR;
  const w = outdoorWeather(DEMO_SITE, scenario);
  const out = {
    start,
    temperature: new Float32Array(n),
    humidity: new Float32Array(n),
    shortwave: new Float32Array(n),
    cloud: new Float32Array(n),
    wind: new Float32Array(n),
  };
  for (let i = 0; i < n; i++) {
    const o = w(new Date(start + i * HOUR));
    out.temperature[i] = WEATHER_VARIABLES.temperature_2m.pick(o);
    out.humidity[i] = WEATHER_VARIABLES.relative_humidity_2m.pick(o);
    out.shortwave[i] = WEATHER_VARIABLES.shortwave_radiation.pick(o);
    out.cloud[i] = overrideNight && out.shortwave[i] === 0 ? overrideNight.cloud : o.cloudCover;
    out.wind[i] = overrideNight && out.shortwave[i] === 0 ? overrideNight.wind : o.windSpeed;
  }
  return out;
}

function benchRollups(): HourlyRollup[] {
  const byHour = new Map<number, HourlyRollup>();
  for (const r of generate(DEMO_SITE, BENCH, scenario, {
    from: new Date(NOW - 14 * DAY),
    to: new Date(NOW),
    intervalMs: 600_000,
    sensorSeed: 101,
  })) {
    const h = Math.floor(r.measuredAt.getTime() / HOUR) * HOUR;
    const x = byHour.get(h) ?? {
      hour: new Date(h),
      tN: 0,
      tMin: 99,
      tMax: -99,
      tSum: 0,
      hN: 0,
      hMin: null,
      hMax: null,
      hSum: null,
      dpMarginMin: null,
      luxN: 0,
      luxSum: null,
    };
    x.tN++;
    x.tSum! += r.temperature;
    x.tMin = Math.min(x.tMin!, r.temperature);
    x.tMax = Math.max(x.tMax!, r.temperature);
    byHour.set(h, x);
  }
  return [...byHour.values()];
}

describe("forecastSpot", () => {
  it("sees the forecast front's night on the bench within 1.5 °C of what the bench will read, 12–48 h ahead", () => {
    const d = drivers(weather(), DEMO_SITE.timeZone);
    const model = fitResponse(benchRollups(), d, { indoor: false, timeZone: DEMO_SITE.timeZone })!;
    const { hours, nights } = forecastSpot(model, d, NOW, { outdoor: true, hours: 48 });
    expect(hours).toHaveLength(48);
    const truth = Math.min(
      ...[
        ...generate(DEMO_SITE, BENCH, scenario, {
          from: front.start,
          to: new Date(front.start.getTime() + 14 * HOUR),
          intervalMs: 600_000,
          sensorSeed: 101,
        }),
      ].map((r) => r.temperature),
    );
    const coldest = nights.reduce((a, n) => (n.expectedLow < a.expectedLow ? n : a));
    const lead = (coldest.at.getTime() - NOW) / HOUR;
    expect(lead).toBeGreaterThanOrEqual(12);
    expect(lead).toBeLessThanOrEqual(48);
    expect(Math.abs(coldest.expectedLow - truth)).toBeLessThan(1.5);
    expect(coldest.lowerBound).toBeLessThan(coldest.expectedLow);
  });

  it("puts the leaves 2 °C under the air on clear, still nights outdoors, and not indoors or on cloudy nights (radiation frost, common practice)", () => {
    const still = drivers(weather({ cloud: 10, wind: 3 }), DEMO_SITE.timeZone);
    const model = fitResponse(benchRollups(), still, { indoor: false, timeZone: DEMO_SITE.timeZone })!;
    const outdoor = forecastSpot(model, still, NOW, { outdoor: true });
    for (const n of outdoor.nights) expect(n.leafLow).toBeCloseTo(n.expectedLow - RADIATIVE_FROST.leafBelowAirC, 6);
    expect(forecastSpot(model, still, NOW, { outdoor: false }).nights.every((n) => n.leafLow === null)).toBe(true);
    const cloudy = drivers(weather({ cloud: 90, wind: 20 }), DEMO_SITE.timeZone);
    expect(forecastSpot(model, cloudy, NOW, { outdoor: true }).nights.every((n) => n.leafLow === null)).toBe(true);
  });
});
