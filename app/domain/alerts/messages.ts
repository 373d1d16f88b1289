// The words of alert e-mails, in the reader's temperature unit and the site's time zone. Plain text
// and HTML carry the same facts: where, the numbers, what to do, and the link straight to the spot.
import { composeMail, type Composed, type MailContext } from "~/domain/alerts/mail";
import { KINDS, type AlertKind } from "~/domain/alerts/rules";
import { formatDelta, formatTemp } from "~/domain/units";

export type Unit = "C" | "F";
export type MessageContext = MailContext & {
  kind: AlertKind;
  threshold: number;
  hysteresis: number;
  durationMinutes: number;
  reason?: string;
};

export type { Composed };

const CAUTION =
  "Alerts are a help, not a guarantee: a sensor can fail, its battery can run out or its connection can drop. On a cold night, look at your plants yourself.";

export function formatValue(kind: AlertKind, v: number, unit: Unit): string {
  switch (KINDS[kind].unit) {
    case "temperature":
      return formatTemp(v, unit);
    case "kelvin":
      return formatDelta(v, unit);
    case "percent":
      return `${Math.round(v)} %`;
    case "minutes":
      return formatDuration(v);
  }
}

export function formatDuration(minutes: number): string {
  const m = Math.round(minutes);
  if (m < 60) return `${m} min`;
  const h = Math.floor(m / 60);
  return m % 60 === 0 ? `${h} h` : `${h} h ${m % 60} min`;
}

const clock = (at: Date, timeZone: string) =>
  new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", weekday: "short" }).format(at);

/** "below 10.0 °C" or "dew-point margin below 2.0 °C" — what the watch looks for. */
export function describeCondition(c: Pick<MessageContext, "kind" | "threshold" | "unit">): string {
  const v = formatValue(c.kind, c.threshold, c.unit);
  switch (c.kind) {
    case "cold":
      return `below ${v}`;
    case "heat":
      return `above ${v}`;
    case "dry":
      return `humidity below ${v}`;
    case "condensation":
      return `within ${v} of the dew point`;
    case "silent":
      return `no reading for ${v}`;
    case "battery":
      return `battery below ${v}`;
  }
}

function render(subject: string, lines: string[], c: MessageContext, why: string): Composed {
  return composeMail(subject, lines, c, CAUTION, why);
}

const whyYou = (c: MessageContext) =>
  `You get this because you are a member of ${c.siteName} and asked for ${KINDS[c.kind].label.toLowerCase()} alerts.`;

export function openMessage(
  c: MessageContext,
  e: {
    startedAt: Date;
    peak: number;
    latest: number | null;
    lastSeenAt?: Date | null;
    lastTemperature?: number | null;
  },
): Composed {
  const info = KINDS[c.kind];
  const where = `${c.spotName} (${c.siteName})`;
  if (c.kind === "silent") {
    const last = e.lastSeenAt
      ? `The last reading came at ${clock(e.lastSeenAt, c.timeZone)}`
      : "No reading has come yet";
    const lastT = e.lastTemperature != null ? `, at ${formatValue("cold", e.lastTemperature, c.unit)}` : "";
    return render(
      `Silent sensor: nothing from ${c.spotName} for ${formatDuration(e.peak)}`,
      [
        `No reading has arrived from ${where} for ${formatDuration(e.peak)} (your watch: ${formatDuration(c.threshold)}).`,
        `${last}${lastT}.`,
        "A silent sensor on a cold night is the dangerous case: if the temperature falls now, no cold-snap alert can reach you.",
        `What to do: ${info.whatToDo}`,
      ],
      c,
      whyYou(c),
    );
  }
  const now = e.latest != null ? `Now ${formatValue(c.kind, e.latest, c.unit)}; ` : "";
  const worst = info.direction === "below" ? "lowest" : "highest";
  const subjectValue = formatValue(c.kind, e.latest ?? e.peak, c.unit);
  const subject =
    c.kind === "cold"
      ? `Cold snap at ${c.spotName}: ${subjectValue}, below your ${formatValue(c.kind, c.threshold, c.unit)} watch`
      : `${info.label} at ${c.spotName}: ${subjectValue} (${describeCondition(c)})`;
  return render(
    subject,
    [
      `${where} has been ${describeCondition(c)} since ${clock(e.startedAt, c.timeZone)}.`,
      `${now}${worst} so far ${formatValue(c.kind, e.peak, c.unit)}. ` +
        `Your watch: ${describeCondition(c)} for ${c.durationMinutes} ` +
        `min.${c.reason ? ` ${c.reason}` : ""}`,
      `What to do: ${info.whatToDo}`,
      c.kind === "cold" ? "Cold-snap alerts are sent during your quiet hours too." : "",
    ],
    c,
    whyYou(c),
  );
}

export function clearMessage(c: MessageContext, e: { startedAt: Date; endedAt: Date; peak: number }): Composed {
  const info = KINDS[c.kind];
  const lasted = formatDuration((e.endedAt.getTime() - e.startedAt.getTime()) / 60_000);
  if (c.kind === "silent") {
    return render(
      `All clear: ${c.spotName} is sending again`,
      [
        `Readings from ${c.spotName} (${c.siteName}) arrive again since ${clock(e.endedAt, c.timeZone)}, after ${lasted} of silence.`,
        "Look at the spot's chart for what happened while it was silent.",
      ],
      c,
      whyYou(c),
    );
  }
  const worst = info.direction === "below" ? "lowest" : "highest";
  const backPast = info.direction === "below" ? c.threshold + c.hysteresis : c.threshold - c.hysteresis;
  const backWord = info.direction === "below" ? "above" : "below";
  return render(
    `All clear at ${c.spotName}: ${info.label.toLowerCase()} over`,
    [
      `${c.spotName} (${c.siteName}) has been back ${backWord} ${formatValue(c.kind, backPast, c.unit)} since ${clock(e.endedAt, c.timeZone)}.`,
      `The spell lasted ${lasted}; the ${worst} was ${formatValue(c.kind, e.peak, c.unit)}.`,
      c.kind === "cold"
        ? "Check tender plants for soft or darkened leaves over the next days before moving them back."
        : "",
    ],
    c,
    whyYou(c),
  );
}

export function earlyMessage(c: MessageContext, p: { minutes: string; ratePerHour: number; latest: number }): Composed {
  const info = KINDS[c.kind];
  const target = formatValue(c.kind, c.threshold, c.unit);
  const rate = formatValue("condensation", Math.abs(p.ratePerHour), c.unit);
  const verb = info.direction === "below" ? "falling" : "rising";
  return render(
    `Early warning: ${c.spotName} may reach ${target} in ${p.minutes}`,
    [
      `${c.spotName} (${c.siteName}) is ${verb} ${rate} an hour; now ${formatValue(c.kind, p.latest, c.unit)}.`,
      `At this rate it reaches ${target} in ${p.minutes}.`,
      `What to do now, while there is time: ${info.whatToDo}`,
      "You will get a separate alert if it crosses the line, and an all-clear when it is over.",
    ],
    c,
    whyYou(c),
  );
}
