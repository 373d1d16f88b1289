// How well two weeks predict a year, on the simulator: for each demo spot and each season, fit the
// response model on 14 days of 2025, project the months it did not see from the ten years of
// weather before (2015–2024, as the weather service fake serves them), and compare with the
// monthly mean daily lows and highs measured through 2025. Against two naive baselines: the
// outdoor climate itself, and the spot's own first two weeks repeated. Goals of issue 16: median
// absolute error ≤ 1.0 °C for windowsills and benches, ≤ 1.5 °C for heated rooms, the truth inside
// the 80 % interval in about 80 % of months. Used by the accuracy test and the benchmark.
import { seasonProfile } from "~/domain/season/profile";
import type { HourlyRollup } from "~/domain/season/types";
import { DEMO_HOUSEHOLD } from "./demo";
import { generate, outdoorWeather, DEMO_SCENARIO } from "./model";
import { WEATHER_VARIABLES } from "./weather-fake";
import { drivers } from "~/domain/projection/drivers";
import { fitResponse, median } from "~/domain/projection/response";
import { projectYear } from "~/domain/projection/project";

const HOUR = 3_600_000;
const DAY = 86_400_000;
const site = {
  latitude: DEMO_HOUSEHOLD.site.latitude,
  longitude: DEMO_HOUSEHOLD.site.longitude,
  timeZone: DEMO_HOUSEHOLD.site.timeZone,
};
const YEAR = 2025;
const PAST = Array.from({ length: 10 }, (_, i) => 2015 + i);
const RUN_STARTS = [
  { season: "winter", at: Date.UTC(YEAR, 0, 12) },
  { season: "spring", at: Date.UTC(YEAR, 3, 12) },
  { season: "summer", at: Date.UTC(YEAR, 6, 12) },
  { season: "autumn", at: Date.UTC(YEAR, 9, 12) },
];

/** Hourly weather as the fake serves it (same rounding), 2014-12-01 to 2026-01-02. */
export function demoWeather() {
  const start = Date.UTC(2014, 11, 1);
  const n = (Date.UTC(YEAR + 1, 0, 2) - start) / HOUR;
  const w = outdoorWeather(site, DEMO_SCENARIO);
  const temperature = new Float32Array(n);
  const humidity = new Float32Array(n);
  const shortwave = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const o = w(new Date(start + i * HOUR));
    temperature[i] = WEATHER_VARIABLES.temperature_2m.pick(o);
    humidity[i] = WEATHER_VARIABLES.relative_humidity_2m.pick(o);
    shortwave[i] = WEATHER_VARIABLES.shortwave_radiation.pick(o);
  }
  return { start, temperature, humidity, shortwave };
}

/** The hourly rollups a year of 10-minute readings makes (Europe/London hours are UTC hours). */
export function yearRollups(spotIndex: number): HourlyRollup[] {
  const s = DEMO_HOUSEHOLD.spots[spotIndex];
  const byHour = new Map<number, HourlyRollup>();
  for (const r of generate(site, s.sim, DEMO_SCENARIO, {
    from: new Date(Date.UTC(YEAR, 0, 1)),
    to: new Date(Date.UTC(YEAR + 1, 0, 1)),
    intervalMs: 600_000,
    sensorSeed: s.sensor.seed,
  })) {
    const h = Math.floor(r.measuredAt.getTime() / HOUR) * HOUR;
    let roll = byHour.get(h);
    if (!roll) {
      roll = {
        hour: new Date(h),
        tN: 0,
        tMin: Infinity,
        tMax: -Infinity,
        tSum: 0,
        hN: 0,
        hMin: Infinity,
        hMax: -Infinity,
        hSum: 0,
        dpMarginMin: null,
        luxN: 0,
        luxSum: null,
      };
      byHour.set(h, roll);
    }
    roll.tN++;
    roll.tSum! += r.temperature;
    roll.tMin = Math.min(roll.tMin!, r.temperature);
    roll.tMax = Math.max(roll.tMax!, r.temperature);
    roll.hN++;
    roll.hSum! += r.humidity;
    roll.hMin = Math.min(roll.hMin!, r.humidity);
    roll.hMax = Math.max(roll.hMax!, r.humidity);
  }
  return [...byHour.values()];
}

type Row = {
  spot: string;
  kind: string;
  runs: number;
  months: number;
  model: number;
  outdoor: number;
  firstWeeks: number;
  coverage: number;
  heldOutRmse: number;
  bySeason: Record<string, number>;
};

export function accuracyTable(): Row[] {
  const weather = demoWeather();
  const plain = drivers(weather, site.timeZone);
  // The outdoor baseline: the past years' monthly mean daily lows and highs of the air itself.
  const outdoorRollups: HourlyRollup[] = [];
  for (let i = 0; i < plain.n; i++) {
    const v = plain.now[i];
    outdoorRollups.push({
      hour: new Date(plain.start + i * HOUR),
      tN: 1,
      tMin: v,
      tMax: v,
      tSum: v,
      hN: 0,
      hMin: null,
      hMax: null,
      hSum: null,
      dpMarginMin: null,
      luxN: 0,
      luxSum: null,
    });
  }
  const outdoorProfile = seasonProfile(outdoorRollups, site, {
    from: new Date(Date.UTC(PAST[0], 0, 1)),
    to: new Date(Date.UTC(PAST[PAST.length - 1] + 1, 0, 1)),
  });
  const outdoorMonth = (month: number, key: "meanDailyLow" | "meanDailyHigh") =>
    median(outdoorProfile.months.filter((m) => m.month === month).map((m) => m.temperature[key]!));

  const rows: Row[] = [];
  for (const [index, spot] of DEMO_HOUSEHOLD.spots.entries()) {
    const rollups = yearRollups(index);
    const d = drivers(weather, site.timeZone, { ...site, facing: spot.facing });
    const truth = seasonProfile(rollups, site, {
      from: new Date(Date.UTC(YEAR, 0, 1)),
      to: new Date(Date.UTC(YEAR + 1, 0, 1)),
    }).months;
    const errs = { model: [] as number[], outdoor: [] as number[], firstWeeks: [] as number[] };
    let inside = 0;
    let total = 0;
    let rmse = 0;
    const bySeason: Record<string, number> = {};
    for (const run of RUN_STARTS) {
      const runErrs: number[] = [];
      const fitRollups = rollups.filter((r) => r.hour.getTime() >= run.at && r.hour.getTime() < run.at + 14 * DAY);
      const model = fitResponse(fitRollups, d, { indoor: spot.indoor, timeZone: site.timeZone })!;
      rmse += model.quality?.hourlyRmseC ?? NaN;
      const projected = projectYear(model, d, site, { years: PAST, seed: index * 10 + 1 });
      const first = seasonProfile(fitRollups, site, {
        from: new Date(run.at),
        to: new Date(run.at + 14 * DAY),
      }).days.filter((x) => x.complete);
      const firstLow = first.reduce((a, x) => a + x.low!, 0) / first.length;
      const firstHigh = first.reduce((a, x) => a + x.high!, 0) / first.length;
      const seen = new Set([new Date(run.at).getUTCMonth() + 1, new Date(run.at + 14 * DAY).getUTCMonth() + 1]);
      for (const t of truth) {
        if (seen.has(t.month)) continue;
        const p = projected[t.month - 1].figures;
        for (const [key, fw] of [
          ["meanDailyLow", firstLow],
          ["meanDailyHigh", firstHigh],
        ] as const) {
          const actual = t.temperature[key]!;
          const f = p[key]!;
          errs.model.push(Math.abs(f.value - actual));
          runErrs.push(Math.abs(f.value - actual));
          errs.outdoor.push(Math.abs(outdoorMonth(t.month, key) - actual));
          errs.firstWeeks.push(Math.abs(fw - actual));
          total++;
          if (actual >= f.low && actual <= f.high) inside++;
        }
      }
      bySeason[run.season] = median(runErrs);
    }
    rows.push({
      bySeason,
      spot: spot.name,
      kind: spot.sim.kind,
      runs: RUN_STARTS.length,
      months: total / 2,
      model: median(errs.model),
      outdoor: median(errs.outdoor),
      firstWeeks: median(errs.firstWeeks),
      coverage: inside / total,
      heldOutRmse: rmse / RUN_STARTS.length,
    });
  }
  return rows;
}

export function formatTable(rows: Row[]): string {
  const f = (x: number) => x.toFixed(1);
  const lines = [
    "| spot | kind | months projected | model MAE °C | outdoor " +
      "climate MAE °C | first 2 weeks repeated MAE °C | inside 80 % " +
      "interval | held-out hourly RMSE °C | model MAE by run: winter / " +
      "spring / summer / autumn |",
    "|---|---|---|---|---|---|---|---|---|",
    ...rows.map(
      (r) =>
        `| ${r.spot} | ${r.kind} | ${r.months} | ${f(r.model)} | ` +
        `${f(r.outdoor)} | ${f(r.firstWeeks)} | ` +
        `${Math.round(r.coverage * 100)} % | ${f(r.heldOutRmse)} | ` +
        `${RUN_STARTS.map((run) => f(r.bySeason[run.season])).join(" / ")} |`,
    ),
  ];
  return lines.join("\n");
}
