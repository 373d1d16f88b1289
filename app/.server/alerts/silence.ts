// The silence watcher: opens a silent-sensor event for a spot whose sensors have said nothing for
// longer than its watch allows (minutes of the real clock, never scaled), keeps its length as the
// peak while it lasts, and closes it when a reading of the spot comes in.
import type { Clock } from "~/.server/alerts/clock";
import type { Notifier } from "~/.server/alerts/notifier";
import * as store from "~/.server/alerts/store";
import type { WatchInContext } from "~/.server/alerts/store";

const MINUTE = 60_000;

/** Minutes the spot has been quiet, when that is longer than the watch allows; null otherwise. */
export function silentMinutes(threshold: number, quietSince: Date, now: Date): number | null {
  const minutes = (now.getTime() - quietSince.getTime()) / MINUTE;
  return minutes >= threshold ? minutes : null;
}

/** Whether any of the readings is recent enough to end the watch's silence. */
export function talking(threshold: number, readingTimes: Date[], now: Date): boolean {
  return readingTimes.some((at) => at.getTime() >= now.getTime() - threshold * MINUTE);
}

export class SilenceWatcher {
  constructor(private readonly o: { clock: Clock; notifier: Notifier }) {}

  /** Opens (or lengthens) the silent-sensor events due now. */
  async check() {
    const now = this.o.clock.now();
    for (const w of await store.silentWatches()) {
      const minutes = silentMinutes(w.threshold, w.quietSince, now);
      if (minutes === null) continue;
      let opened: number | null = null;
      await store.inTransaction(async (tx) => {
        await store.lockWatch(tx, w.id);
        const open = await store.openEvent(w.id, tx);
        if (open) await store.setEventPeak(tx, open.id, minutes);
        else opened = await store.insertEvent(tx, w, w.quietSince, minutes);
      });
      if (opened != null) await this.o.notifier.deliverEvent(opened, "open");
    }
  }

  /** Readings of the watch's spot came in: a talking sensor ends the silence, if there is one. */
  async heard(w: WatchInContext, readingTimes: Date[]) {
    const now = this.o.clock.now();
    if (!talking(w.threshold, readingTimes, now)) return;
    for (const id of await store.closeSilence(w.id, now)) await this.o.notifier.deliverEvent(id, "clear");
  }
}
