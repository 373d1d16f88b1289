// The alerts' one outbox: who of a site's members a message is for, claiming it for each before it
// goes (at most one e-mail per member, even across restarts), composing, sending, and giving the
// claim back when the send fails so the retry sends it. Alert events, early warnings and forecast
// warnings all post their letters here.
import { systemClock, type Clock } from "~/.server/alerts/clock";
import { siteRecipients, type Recipient } from "~/.server/alerts/recipients";
import * as store from "~/.server/alerts/store";
import type { DeliveryMessage, WatchInContext } from "~/.server/alerts/store";
import { publicUrl } from "~/.server/env";
import { sendMail } from "~/.server/mail";
import { latestReading } from "~/.server/series";
import { roundMinutes, type Projection } from "~/domain/alerts/early-warning";
import { clearMessage, earlyMessage, openMessage, type Composed, type MessageContext } from "~/domain/alerts/messages";
import { inQuietHours } from "~/domain/alerts/quiet";
import { KINDS, valueFor, type AlertKind } from "~/domain/alerts/rules";

export type LetterSource = "alert" | "early" | "forecast";

export type Letter = {
  source: LetterSource;
  siteId: number;
  /** Whether the member (who takes e-mail) is to get it. */
  for: (r: Recipient) => boolean;
  compose: (r: Recipient) => Composed;
  /** Claims the message for the member before it goes; false when it is theirs already. */
  claim?: (r: Recipient) => Promise<boolean>;
  /** Gives the member's claim back after a failed send. */
  release?: (r: Recipient) => Promise<void>;
};

export type NotifierOptions = {
  clock?: Clock;
  log?: (s: string) => void;
  /** Called after each e-mail the mail server took. */
  onSent?: (letter: Letter, to: Recipient, mail: Composed) => void;
};

const RETRY_WINDOW_MS = 24 * 3_600_000;

export const wantsKind = (r: Recipient, kind: AlertKind) => r.kinds.includes(kind);

/** What every alert message of the watch says about where and what. */
export function messageContext(w: WatchInContext, r: Recipient): MessageContext {
  const base = publicUrl();
  return {
    siteName: w.siteName,
    spotName: w.spotName,
    spotUrl: `${base}/sites/${w.siteId}/spots/${w.spotId}`,
    alertsUrl: `${base}/sites/${w.siteId}/alerts`,
    timeZone: w.timeZone,
    unit: r.unit,
    kind: w.kind,
    threshold: w.threshold,
    hysteresis: w.hysteresis,
    durationMinutes: w.durationMinutes,
    reason: w.reason || undefined,
  };
}

export class Notifier {
  readonly clock: Clock;
  private readonly log: (s: string) => void;
  private readonly onSent?: NotifierOptions["onSent"];

  constructor(opts: NotifierOptions = {}) {
    this.clock = opts.clock ?? systemClock;
    this.log = opts.log ?? (() => {});
    this.onSent = opts.onSent;
  }

  /** Sends the letter to each member it is for; true when no send failed. */
  async post(letter: Letter): Promise<boolean> {
    let failed = false;
    for (const r of await siteRecipients(letter.siteId)) {
      if (!r.wantsEmail || !letter.for(r)) continue;
      if (letter.claim && !(await letter.claim(r))) continue;
      const mail = letter.compose(r);
      try {
        await sendMail({ to: r.email, subject: mail.subject, text: mail.text, html: mail.html });
        this.onSent?.(letter, r, mail);
      } catch (err) {
        failed = true;
        await letter.release?.(r);
        console.error(
          `[alerts] ${letter.source} e-mail to ${r.email} not sent${letter.release ? " (will retry)" : ""}:`,
          store.failure(err),
        );
      }
    }
    return !failed;
  }

  /** The event's opening or all-clear, once per member; marked sent on the event when nobody's failed. */
  async deliverEvent(eventId: number, message: DeliveryMessage) {
    const ev = await store.getEvent(eventId);
    if (!ev || (message === "open" ? ev.notifiedAt : ev.clearNotifiedAt)) return;
    const w = await store.getWatch(ev.ruleId);
    if (!w) return;
    const now = this.clock.now();
    const latest = message === "open" ? await this.latest(w) : null;
    // The all-clear goes to those who heard about the event, nobody else.
    const heard = message === "clear" ? await store.heardOpen(ev.id) : null;
    const sent = await this.post({
      source: "alert",
      siteId: w.siteId,
      for: (r) =>
        wantsKind(r, w.kind) &&
        (heard ? heard.has(r.userId) : KINDS[w.kind].urgent || !inQuietHours(now, w.timeZone, r.quietFrom, r.quietTo)),
      claim: (r) => store.claimDelivery(ev.id, r.userId, message),
      release: (r) => store.releaseDelivery(ev.id, r.userId, message),
      compose: (r) =>
        latest
          ? openMessage(messageContext(w, r), {
              startedAt: ev.startedAt,
              peak: ev.peak ?? latest.value ?? w.threshold,
              latest: latest.value,
              lastSeenAt: latest.at,
              lastTemperature: latest.t,
            })
          : clearMessage(messageContext(w, r), {
              startedAt: ev.startedAt,
              endedAt: ev.endedAt ?? now,
              peak: ev.peak ?? w.threshold,
            }),
    });
    if (!sent) return;
    await store.markNotified(ev.id, message, this.clock.now());
    this.log(`Alert ${message === "open" ? "opened" : "cleared"}: ${KINDS[w.kind].label} at ${w.spotName}`);
  }

  /** Sends what a crash or a mail-server hiccup left unsent (from the last day). */
  async retryUndelivered() {
    const since = new Date(this.clock.now().getTime() - RETRY_WINDOW_MS);
    for (const e of await store.undeliveredEvents(since)) await this.deliverEvent(e.id, e.message);
  }

  /** The early warning of a watch (claimed on the watch by the evaluator): not retried, like a glance out of the window. */
  async earlyWarning(w: WatchInContext, projection: Projection, latest: number) {
    this.log(`Early warning for ${w.spotName}: ${w.kind} threshold in ${Math.round(projection.minutes)} rule minutes`);
    await this.post({
      source: "early",
      siteId: w.siteId,
      for: (r) => wantsKind(r, w.kind),
      compose: (r) =>
        earlyMessage(messageContext(w, r), {
          minutes: roundMinutes(projection.minutes),
          ratePerHour: projection.ratePerHour,
          latest,
        }),
    });
  }

  private async latest(w: WatchInContext): Promise<{ at: Date | null; value: number | null; t: number | null }> {
    const row = await latestReading(w.spotId);
    if (!row) return { at: null, value: null, t: null };
    return {
      at: new Date(row.measured_at),
      value: valueFor(w.kind, { t: row.temp, h: row.rh, battery: row.battery }),
      t: row.temp,
    };
  }
}
