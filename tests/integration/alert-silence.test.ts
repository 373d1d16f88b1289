// The silence watcher on its own, with a fixed clock moved by hand: a spot quiet for longer than
// its watch allows gets one event (from the moment it went quiet), which grows while the quiet
// lasts and closes, with one all-clear, when a recent reading comes in.
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { fixedClock } from "~/.server/alerts/clock";
import { Notifier } from "~/.server/alerts/notifier";
import { SilenceWatcher } from "~/.server/alerts/silence";
import { getWatch } from "~/.server/alerts/store";
import { db } from "~/.server/db";
import { sunkMail } from "~/.server/mail";
import { alertEvents, sensors, watches } from "~/db/schema.server";
import { addMember, makeSensor, makeSite, makeSpot, makeUser, useMailSink } from "./helpers";

const MIN = 60_000;

useMailSink();

describe("silence watcher", () => {
  it("opens one silent-sensor event after the watch's minutes, lengthens it, and closes it when the sensor speaks", async () => {
    const owner = await makeUser();
    const carer = await makeUser();
    const site = await makeSite(owner);
    await addMember(site, carer, "carer");
    const spot = await makeSpot(site, { indoor: false, name: `Shed ${Math.random().toString(36).slice(2, 8)}` });
    const sensor = await makeSensor(site, spot);
    const quietSince = new Date(Math.floor(Date.now() / MIN) * MIN);
    await db().update(sensors).set({ lastSeenAt: quietSince }).where(eq(sensors.id, sensor.id));
    const silent = {
      spotId: spot.id,
      kind: "silent" as const,
      threshold: 60,
      durationMinutes: 0,
      hysteresis: 0,
      clearMinutes: 0,
    };
    const [w] = await db().insert(watches).values(silent).returning();

    const clock = fixedClock(quietSince.getTime() + 59 * MIN);
    const watcher = new SilenceWatcher({ clock, notifier: new Notifier({ clock }) });
    const events = () => db().select().from(alertEvents).where(eq(alertEvents.ruleId, w.id));
    const mails = () => sunkMail().filter((m) => m.subject.includes(spot.name));

    await watcher.check();
    expect(await events()).toEqual([]);

    clock.set(quietSince.getTime() + 90 * MIN);
    await watcher.check();
    let [ev] = await events();
    expect(ev).toMatchObject({ startedAt: quietSince, peak: 90, endedAt: null, notifiedAt: clock.now() });
    expect(
      mails()
        .map((m) => m.to[0])
        .sort(),
    ).toEqual([owner.email, carer.email].sort());

    clock.set(quietSince.getTime() + 120 * MIN);
    await watcher.check();
    expect(await events()).toHaveLength(1);
    [ev] = await events();
    expect(ev.peak).toBe(120);
    expect(mails()).toHaveLength(2);

    // A reading from long ago (a logger's backlog) is no sign of life; a recent one is.
    clock.set(quietSince.getTime() + 121 * MIN);
    const watch = (await getWatch(w.id))!;
    await watcher.heard(watch, [new Date(quietSince.getTime() + 30 * MIN)]);
    expect((await events())[0].endedAt).toBeNull();
    await watcher.heard(watch, [new Date(quietSince.getTime() + 121 * MIN)]);
    [ev] = await events();
    expect(ev).toMatchObject({ endedAt: clock.now(), peak: 121, clearNotifiedAt: clock.now() });
    const clears = mails().filter((m) => m.subject.startsWith("All clear"));
    expect(clears.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email].sort());
  });
});
