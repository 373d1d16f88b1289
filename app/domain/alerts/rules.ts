// The streaming rule state machine: one rule of one spot, fed that spot's committed readings in time
// order. Pure: the caller loads the state from PostgreSQL, feeds points and stores what comes back.
//
// Open: the value has been past the threshold (with at most brief returns inside the hysteresis
// band) for durationMinutes, and the latest point is past it. Clear: the value has stayed back by
// at least the hysteresis for clearMinutes. A reading hovering at the threshold therefore opens one
// event and never flaps it.
import { dewPointMargin } from "~/domain/climate/psychro";

import { WATCH_KINDS, type WatchKind } from "~/domain/vocabulary";

export type AlertKind = WatchKind;
export const ALERT_KINDS: AlertKind[] = [...WATCH_KINDS];

export type KindInfo = {
  label: string;
  /** The event opens when the value goes below (or above) the threshold. */
  direction: "below" | "above";
  unit: "temperature" | "percent" | "kelvin" | "minutes";
  /** Quiet hours never hold these back: they are the ones that kill plants overnight. */
  urgent: boolean;
  defaults: { threshold: number; durationMinutes: number; hysteresis: number; clearMinutes: number };
  whatToDo: string;
};

export const KINDS: Record<AlertKind, KindInfo> = {
  cold: {
    label: "Cold snap",
    direction: "below",
    unit: "temperature",
    urgent: true,
    defaults: { threshold: 10, durationMinutes: 10, hysteresis: 1, clearMinutes: 30 },
    whatToDo:
      "Bring tender plants indoors, or move them together against a wall and cover them with horticultural fleece; close windows and vents near indoor spots.",
  },
  heat: {
    label: "Too hot",
    direction: "above",
    unit: "temperature",
    urgent: false,
    defaults: { threshold: 32, durationMinutes: 20, hysteresis: 1, clearMinutes: 30 },
    whatToDo: "Shade the spot, open a window or move the plants out of the sun; water plants that have dried out.",
  },
  dry: {
    label: "Dry air",
    direction: "below",
    unit: "percent",
    urgent: false,
    defaults: { threshold: 35, durationMinutes: 60, hysteresis: 5, clearMinutes: 60 },
    whatToDo: "Stand the plants on a humidity tray, group them, or move them away from the radiator.",
  },
  condensation: {
    label: "Condensation risk",
    direction: "below",
    unit: "kelvin",
    urgent: false,
    defaults: { threshold: 2, durationMinutes: 30, hysteresis: 1, clearMinutes: 30 },
    whatToDo: "Air the room, keep leaves off the cold glass and water early in the day so leaves are dry by night.",
  },
  silent: {
    label: "Silent sensor",
    direction: "above",
    unit: "minutes",
    urgent: true,
    defaults: { threshold: 60, durationMinutes: 0, hysteresis: 0, clearMinutes: 0 },
    whatToDo:
      "Check the sensor's battery, its Wi-Fi or radio link and the " +
      "hub. Until it is back you cannot see a cold snap coming — on a " +
      "cold night, check the plants yourself.",
  },
  battery: {
    label: "Battery low",
    direction: "below",
    unit: "percent",
    urgent: false,
    defaults: { threshold: 15, durationMinutes: 0, hysteresis: 5, clearMinutes: 0 },
    whatToDo: "Replace or recharge the sensor's battery soon, before it goes silent on a cold night.",
  },
};

export type RuleSettings = {
  kind: AlertKind;
  threshold: number;
  durationMinutes: number;
  hysteresis: number;
  clearMinutes: number;
};

export type OpenEvent = { startedAt: Date; peak: number };
export type RuleState = {
  pendingSince: Date | null;
  clearingSince: Date | null;
  open: OpenEvent | null;
  /** The instant of the newest point evaluated so far; older points arriving later are late. */
  cursor?: Date | null;
};
export type Point = { at: Date; value: number };
export type Transition =
  { type: "open"; startedAt: Date; at: Date; peak: number } | { type: "clear"; at: Date; peak: number };

/** The reading's value that a rule of this kind watches, or null when the reading lacks it. */
export function valueFor(
  kind: AlertKind,
  r: { t: number | null; h: number | null; battery: number | null },
): number | null {
  switch (kind) {
    case "cold":
    case "heat":
      return r.t;
    case "dry":
      return r.h;
    case "condensation": {
      if (r.t == null || r.h == null) return null;
      const m = dewPointMargin(r.t, r.h);
      return Number.isFinite(m) ? m : null;
    }
    case "battery":
      return r.battery;
    case "silent":
      return null;
  }
}

export const isPast = (kind: AlertKind, threshold: number, v: number) =>
  KINDS[kind].direction === "below" ? v < threshold : v > threshold;

/** Back by at least the hysteresis: the only thing that counts towards the all-clear. */
export const isBack = (kind: AlertKind, threshold: number, hysteresis: number, v: number) =>
  KINDS[kind].direction === "below" ? v >= threshold + hysteresis : v <= threshold - hysteresis;

/** The worse of two values for this kind (lowest for cold, highest for heat). */
export const worse = (kind: AlertKind, a: number, b: number) =>
  KINDS[kind].direction === "below" ? Math.min(a, b) : Math.max(a, b);

/**
 * Feeds points through the rule in time order. `minuteMs` is the length of a rule minute; only the
 * compressed demo front changes it.
 *
 * Order-safe: points older than the state's cursor (the newest instant already evaluated) arrive
 * late — another sensor of the spot, a resend after a reconnect, a swapped send. They cannot reopen
 * or advance the state, since that could start an event inside one already reported; they only
 * count towards an open event's peak when they fall inside it. Points at the cursor's instant
 * (another sensor's reading of the same minute) are evaluated.
 */
export function evaluate(
  rule: RuleSettings,
  state: RuleState,
  points: Point[],
  minuteMs = 60_000,
): { state: RuleState; transitions: Transition[] } {
  let { pendingSince, clearingSince, open } = state;
  let cursor = state.cursor ?? null;
  open = open ? { ...open } : null;
  const transitions: Transition[] = [];
  let pendingPeak: number | null = null;
  const need = rule.durationMinutes * minuteMs;
  const clearNeed = rule.clearMinutes * minuteMs;
  const sorted = points.every((p, i) => i === 0 || points[i - 1].at.getTime() <= p.at.getTime())
    ? points
    : points.slice().sort((a, b) => a.at.getTime() - b.at.getTime());
  for (const p of sorted) {
    if (!Number.isFinite(p.value)) continue;
    if (cursor && p.at.getTime() < cursor.getTime()) {
      if (open && p.at.getTime() >= open.startedAt.getTime()) open.peak = worse(rule.kind, open.peak, p.value);
      continue;
    }
    cursor = p.at;
    const past = isPast(rule.kind, rule.threshold, p.value);
    const back = isBack(rule.kind, rule.threshold, rule.hysteresis, p.value);
    if (!open) {
      if (back) {
        pendingSince = null;
        pendingPeak = null;
        continue;
      }
      if (past) {
        if (!pendingSince) pendingSince = p.at;
        pendingPeak = pendingPeak == null ? p.value : worse(rule.kind, pendingPeak, p.value);
        if (p.at.getTime() - pendingSince.getTime() >= need) {
          open = { startedAt: pendingSince, peak: pendingPeak };
          transitions.push({ type: "open", startedAt: pendingSince, at: p.at, peak: pendingPeak });
          pendingSince = null;
          pendingPeak = null;
          clearingSince = null;
        }
      }
      continue;
    }
    open.peak = worse(rule.kind, open.peak, p.value);
    if (!back) {
      clearingSince = null;
      continue;
    }
    if (!clearingSince) clearingSince = p.at;
    if (p.at.getTime() - clearingSince.getTime() >= clearNeed) {
      transitions.push({ type: "clear", at: p.at, peak: open.peak });
      open = null;
      clearingSince = null;
      pendingSince = null;
    }
  }
  return { state: { pendingSince, clearingSince, open, cursor }, transitions };
}
