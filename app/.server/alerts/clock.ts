// The one clock of the alert engine and the forecast warnings: passed in, so tests set the time.
export type Clock = { now: () => Date };

export const systemClock: Clock = { now: () => new Date() };

/** A clock standing at `at` until moved: for tests and replays (no timers are involved). */
export function fixedClock(at: Date | number): Clock & { set: (at: Date | number) => void } {
  let t = new Date(at);
  return { now: () => new Date(t), set: (next) => (t = new Date(next)) };
}
