// A spot's response to the outdoor weather, learned from its hourly rollups and the outdoor
// weather of the same hours (docs/decisions/0003-spot-response-model.md). Pure: no I/O.
//
//   free(t)  = β · [1, outdoor now, outdoor smoothed over 3 h, 12 h and 48 h (thermal mass),
//                   sun, sun × time of day (which way the window faces), time of day (2 harmonics)]
//   spot(t)  = min(ceiling(hour), max(floor(hour), free(t)))
//
// The floor (heating) and the ceiling (cooling) are found as clipping: hours where the spot stops
// following the outdoor air and holds a level that depends only on the time of day. β is a ridge
// regression pulled towards a physical prior (an outdoor spot follows the air; an indoor one its
// two-day mean plus a few degrees), so directions the two weeks never showed fall back on physics.
// Its inputs come from drivers.ts.
import { DAY_MS, drivers, HOUR_MS, type Drivers, type OutdoorSeries, type Place } from "~/domain/projection/drivers";
import { saturationVapourPressure } from "~/domain/climate/psychro";
import { solve } from "~/domain/projection/solve";
import type { HourlyRollup } from "~/domain/season/types";
import type { ModelQuality, ResponseModel } from "~/domain/projection/response-model";

export type { ModelQuality, ResponseModel } from "~/domain/projection/response-model";

const N_FEATURES = 13;
// Ridge strength per standardised feature, as a share of the hours fitted.
const RIDGE = 0.02;
const CLIP_MARGIN_C = 0.4;
export const MIN_DAYS = 5;

// sin and cos of the hour of day and of twice it, by hour: ten years of hours ask for them.
const HARMONICS = Array.from({ length: 24 }, (_, hour) => {
  const h = (2 * Math.PI * hour) / 24;
  return [Math.sin(h), Math.cos(h), Math.sin(2 * h), Math.cos(2 * h)];
});

function features(d: Drivers, i: number, out: Float64Array): void {
  const [s1, c1, s2, c2] = HARMONICS[d.hourOfDay[i]];
  // Behind glass the warmth comes with the beam on the pane (it saturates: the sill and the air
  // around the sensor shed heat faster the warmer they are); the sky's light only as a little diffuse gain.
  const sun = d.hasWindow ? d.windowSun[i] : d.sun[i];
  out[0] = 1;
  out[1] = d.now[i];
  out[2] = d.smooth[0][i];
  out[3] = d.smooth[1][i];
  out[4] = d.smooth[2][i];
  out[5] = sun;
  out[6] = sun * s1;
  out[7] = sun * c1;
  out[8] = s1;
  out[9] = c1;
  out[10] = s2;
  out[11] = c2;
  out[12] = d.hasWindow ? Math.min(d.sun[i], 1.5) : d.windowSun[i];
}

/** Prior coefficients: outdoors the spot is the air; indoors its two-day mean plus internal gains (~4 °C, memory). */
function prior(indoor: boolean): number[] {
  const b = new Array<number>(N_FEATURES).fill(0);
  if (indoor) {
    b[0] = 4;
    b[4] = 1;
  } else b[1] = 1;
  return b;
}

function freePrediction(beta: number[], d: Drivers, i: number, x: Float64Array): number {
  features(d, i, x);
  let y = 0;
  for (let k = 0; k < N_FEATURES; k++) y += beta[k] * x[k];
  return y;
}

export function predictHour(m: ResponseModel, d: Drivers, i: number, x = new Float64Array(N_FEATURES)): number {
  let y = freePrediction(m.beta, d, i, x);
  const h = d.hourOfDay[i];
  const f = m.floor?.[h];
  if (f != null && y < f) y = f;
  const c = m.ceiling?.[h];
  if (c != null && y > c) y = c;
  return y;
}

type Sample = { i: number; y: number; yMin: number; yMax: number; rh: number | null; day: number };

/** The rollups that line up with known outdoor hours, as samples. */
function samples(rollups: HourlyRollup[], d: Drivers): Sample[] {
  const out: Sample[] = [];
  for (const r of rollups) {
    if (r.tN === 0 || r.tSum === null) continue;
    const i = Math.round((r.hour.getTime() - d.start) / HOUR_MS);
    if (i < 0 || i >= d.n) continue;
    const y = r.tSum / r.tN;
    out.push({
      i,
      y,
      yMin: r.tMin ?? y,
      yMax: r.tMax ?? y,
      rh: r.hN > 0 && r.hSum !== null ? r.hSum / r.hN : null,
      day: Math.floor((r.hour.getTime() + 0) / DAY_MS),
    });
  }
  return out;
}

/** Ridge regression towards `b0`, features standardised so one strength suits all. */
function ridge(d: Drivers, data: Sample[], b0: number[], lambdaShare: number): number[] {
  const n = data.length;
  const x = new Float64Array(N_FEATURES);
  if (n < 24) return b0.slice();
  const mean = new Float64Array(N_FEATURES);
  const sq = new Float64Array(N_FEATURES);
  for (const s of data) {
    features(d, s.i, x);
    for (let k = 1; k < N_FEATURES; k++) {
      mean[k] += x[k];
      sq[k] += x[k] * x[k];
    }
  }
  const scale = new Float64Array(N_FEATURES);
  scale[0] = 1;
  for (let k = 1; k < N_FEATURES; k++) {
    mean[k] /= n;
    const v = sq[k] / n - mean[k] * mean[k];
    scale[k] = v > 1e-9 ? Math.sqrt(v) : 1;
  }
  // Solve for δ = β − β0 on scaled features: (ZᵀZ + λI) δz = Zᵀ(y − Xβ0), intercept unpenalised.
  const A = Array.from({ length: N_FEATURES }, () => new Float64Array(N_FEATURES));
  const rhs = new Float64Array(N_FEATURES);
  const z = new Float64Array(N_FEATURES);
  for (const s of data) {
    features(d, s.i, x);
    let base = 0;
    for (let k = 0; k < N_FEATURES; k++) base += b0[k] * x[k];
    const r = s.y - base;
    z[0] = 1;
    for (let k = 1; k < N_FEATURES; k++) z[k] = (x[k] - mean[k]) / scale[k];
    for (let a = 0; a < N_FEATURES; a++) {
      rhs[a] += z[a] * r;
      for (let b = a; b < N_FEATURES; b++) A[a][b] += z[a] * z[b];
    }
  }
  const lambda = lambdaShare * n;
  for (let a = 0; a < N_FEATURES; a++) {
    for (let b = 0; b < a; b++) A[a][b] = A[b][a];
    if (a > 0) A[a][a] += lambda;
  }
  const dz = solve(A, rhs);
  if (!dz) return b0.slice();
  const beta = b0.slice();
  beta[0] += dz[0];
  for (let k = 1; k < N_FEATURES; k++) {
    beta[k] += dz[k] / scale[k];
    beta[0] -= (dz[k] * mean[k]) / scale[k];
  }
  return beta;
}

/**
 * A clipping level by hour of day: the hours the free response puts beyond the readings (colder
 * than measured for a floor), when they are a good share of the hours, hold a level that depends on
 * the hour of day, and no longer follow the outdoor air (slope under 0.1 °C per °C).
 */
function detectClip(d: Drivers, data: Sample[], beta: number[], sign: 1 | -1): (number | null)[] | null {
  const x = new Float64Array(N_FEATURES);
  const byHour: Sample[][] = Array.from({ length: 24 }, () => []);
  let clipped = 0;
  for (const s of data) {
    const free = freePrediction(beta, d, s.i, x);
    if (sign * (s.y - free) > CLIP_MARGIN_C) {
      byHour[d.hourOfDay[s.i]].push(s);
      clipped++;
    }
  }
  if (clipped < 0.3 * data.length || clipped < 48) return null;
  const level: (number | null)[] = new Array(24).fill(null);
  // Pooled within-hour slope of the readings on the 12-hour outdoor air, and the scatter.
  let sxy = 0;
  let sxx = 0;
  let see = 0;
  let m = 0;
  for (let h = 0; h < 24; h++) {
    const list = byHour[h];
    if (list.length < 3) continue;
    const ys = list.map((s) => s.y).sort((a, b) => a - b);
    level[h] = ys[Math.floor(ys.length / 2)];
    const mx = list.reduce((a, s) => a + d.smooth[1][s.i], 0) / list.length;
    const my = list.reduce((a, s) => a + s.y, 0) / list.length;
    for (const s of list) {
      sxy += (d.smooth[1][s.i] - mx) * (s.y - my);
      sxx += (d.smooth[1][s.i] - mx) ** 2;
      see += (s.y - my) ** 2;
      m++;
    }
  }
  if (m < 48) return null;
  const slope = sxx > 0 ? sxy / sxx : 0;
  const sd = Math.sqrt(see / m);
  if (Math.abs(slope) > 0.1 || sd > 0.8) return null;
  // Hours of the day never seen clipped take their neighbours' level.
  for (let h = 0; h < 24; h++) {
    if (level[h] !== null) continue;
    for (let k = 1; k < 12; k++) {
      const v = level[(h + k) % 24] ?? level[(h + 24 - k) % 24];
      if (v != null) {
        level[h] = v;
        break;
      }
    }
  }
  return level;
}

export type FitOptions = { indoor: boolean; timeZone: string; place?: Place; holdOutDays?: number };

/** Fits the response of one spot; null when fewer than MIN_DAYS days line up with the weather. */
export function fitResponse(
  rollups: HourlyRollup[],
  weather: OutdoorSeries | Drivers,
  opts: FitOptions,
): ResponseModel | null {
  const d = "smooth" in weather ? weather : drivers(weather, opts.timeZone, opts.place);
  const all = samples(rollups, d);
  const days = [...new Set(all.map((s) => s.day))].sort((a, b) => a - b);
  if (days.length < MIN_DAYS) return null;
  const holdOut = opts.holdOutDays ?? (days.length >= 10 ? 3 : 0);
  let quality: ModelQuality | null = null;
  if (holdOut > 0) {
    const cut = days[days.length - holdOut];
    const train = all.filter((s) => s.day < cut);
    const test = all.filter((s) => s.day >= cut);
    const m = fitOn(train, d, opts);
    quality = assess(m, d, test);
  }
  const model = fitOn(all, d, opts);
  model.quality = quality;
  return model;
}

function fitOn(data: Sample[], d: Drivers, opts: FitOptions): ResponseModel {
  const b0 = prior(opts.indoor);
  let beta = ridge(d, data, b0, RIDGE);
  let floor: (number | null)[] | null = null;
  let ceiling: (number | null)[] | null = null;
  // Clipping is judged against the prior's free response first (a heated room in winter may never
  // run free), then against the refitted one.
  for (let round = 0; round < 3; round++) {
    const against = round === 0 ? b0 : beta;
    floor = detectClip(d, data, against, 1) ?? (round === 0 ? null : floor);
    ceiling = detectClip(d, data, against, -1) ?? (round === 0 ? null : ceiling);
    const free = data.filter((s) => {
      const h = d.hourOfDay[s.i];
      return (
        !(floor?.[h] != null && s.y < floor[h]! + CLIP_MARGIN_C) &&
        !(ceiling?.[h] != null && s.y > ceiling[h]! - CLIP_MARGIN_C)
      );
    });
    beta = ridge(d, free, b0, free.length < data.length ? RIDGE * 5 : RIDGE);
    if (!floor && !ceiling) break;
  }
  const partial: ResponseModel = {
    beta,
    floor,
    ceiling,
    vapourExcessHpa: null,
    lowOffsetC: 0,
    highOffsetC: 0,
    residualDays: [],
    outdoorRange: [Infinity, -Infinity],
    hoursFitted: data.length,
    quality: null,
    timeZone: opts.timeZone,
  };
  const x = new Float64Array(N_FEATURES);
  const excess: number[] = [];
  const byDay = new Map<number, number[]>();
  const extremes = new Map<number, { lo: number; hi: number; loMean: number; hiMean: number; n: number }>();
  for (const s of data) {
    const r = s.y - predictHour(partial, d, s.i, x);
    let list = byDay.get(s.day);
    if (!list) byDay.set(s.day, (list = []));
    list.push(r);
    const e = extremes.get(s.day);
    if (!e) extremes.set(s.day, { lo: s.yMin, hi: s.yMax, loMean: s.y, hiMean: s.y, n: 1 });
    else {
      e.lo = Math.min(e.lo, s.yMin);
      e.hi = Math.max(e.hi, s.yMax);
      e.loMean = Math.min(e.loMean, s.y);
      e.hiMean = Math.max(e.hiMean, s.y);
      e.n++;
    }
    if (s.rh !== null) excess.push((saturationVapourPressure(s.y) * s.rh) / 100 - d.outdoorVapour[s.i]);
    const dm = d.dailyMean[s.i];
    if (dm < partial.outdoorRange[0]) partial.outdoorRange[0] = dm;
    if (dm > partial.outdoorRange[1]) partial.outdoorRange[1] = dm;
  }
  partial.residualDays = [...byDay.values()].filter((l) => l.length >= 12);
  const whole = [...extremes.values()].filter((e) => e.n >= 18);
  partial.lowOffsetC = whole.length ? median(whole.map((e) => e.lo - e.loMean)) : 0;
  partial.highOffsetC = whole.length ? median(whole.map((e) => e.hi - e.hiMean)) : 0;
  partial.vapourExcessHpa = excess.length >= 24 ? median(excess) : null;
  return partial;
}

function assess(m: ResponseModel, d: Drivers, test: Sample[]): ModelQuality | null {
  if (test.length < 24) return null;
  const x = new Float64Array(N_FEATURES);
  let se = 0;
  const days = new Map<number, { lo: number; hi: number; plo: number; phi: number }>();
  for (const s of test) {
    const p = predictHour(m, d, s.i, x);
    se += (p - s.y) ** 2;
    const day = days.get(s.day);
    if (!day) days.set(s.day, { lo: s.yMin, hi: s.yMax, plo: p + m.lowOffsetC, phi: p + m.highOffsetC });
    else {
      day.lo = Math.min(day.lo, s.yMin);
      day.hi = Math.max(day.hi, s.yMax);
      day.plo = Math.min(day.plo, p + m.lowOffsetC);
      day.phi = Math.max(day.phi, p + m.highOffsetC);
    }
  }
  const list = [...days.values()];
  return {
    daysHeldOut: list.length,
    hourlyRmseC: Math.sqrt(se / test.length),
    dailyLowMaeC: list.reduce((a, v) => a + Math.abs(v.plo - v.lo), 0) / list.length,
    dailyHighMaeC: list.reduce((a, v) => a + Math.abs(v.phi - v.hi), 0) / list.length,
    biasC: list.reduce((a, v) => a + (v.plo - v.lo + v.phi - v.hi) / 2, 0) / list.length,
  };
}

export function median(xs: number[]): number {
  if (xs.length === 0) return 0;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
