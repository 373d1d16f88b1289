// The shapes a fitted spot-response model takes (response.ts fits them): the model itself and how
// well it did on the days held out of the fit. Types only.

export type ResponseModel = {
  beta: number[];
  /** Heating floor / cooling ceiling by local hour of day, or null where none showed. */
  floor: (number | null)[] | null;
  ceiling: (number | null)[] | null;
  /** Indoor vapour pressure over outdoor, hPa (people, plants, cooking); null without humidity. */
  vapourExcessHpa: number | null;
  /**
   * How far a day's lowest reading falls below its lowest hourly mean, and its highest reading rises
   * above its highest hourly mean (medians over the fitted days): the model speaks in hourly means,
   * the season profile in readings. Larger on a sunny sill, where the sun comes and goes within the hour.
   */
  lowOffsetC: number;
  highOffsetC: number;
  /** Residuals (measured − fitted hourly mean) per fitted local day, for the bootstrap. */
  residualDays: number[][];
  /** The outdoor daily means the fit saw, °C: outside them the model extrapolates. */
  outdoorRange: [number, number];
  hoursFitted: number;
  quality: ModelQuality | null;
  timeZone: string;
};

export type ModelQuality = {
  /** Days held out of the fit (the last ones), and the errors on them. */
  daysHeldOut: number;
  hourlyRmseC: number;
  dailyLowMaeC: number;
  dailyHighMaeC: number;
  /** Mean error (fitted − measured) of the held-out days' lows and highs: a bias. */
  biasC: number;
};
