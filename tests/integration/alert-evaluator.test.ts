// The evaluator on its own, with a fixed clock: readings → watch state → events and e-mails, and
// the early warning claimed at the clock's instant. The clock is its only time source: the same
// readings are history to the machine's clock (more than the six-hour horizon ago).
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { fixedClock, systemClock, type Clock } from "~/.server/alerts/clock";
import { Evaluator } from "~/.server/alerts/evaluator";
import { Notifier } from "~/.server/alerts/notifier";
import { getWatch, spotPoints } from "~/.server/alerts/store";
import { db } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { sunkMail } from "~/.server/mail";
import { alertEvents, watches } from "~/db/schema.server";
import { addMember, makeSensor, makeSite, makeSpot, makeUser, useMailSink } from "./helpers";

const MIN = 60_000;
const HOUR = 60 * MIN;
// Three days ago, on the minute: well behind the machine's clock and its six-hour horizon.
const BASE = Math.floor((Date.now() - 3 * 24 * HOUR) / MIN) * MIN;

useMailSink();

async function household() {
  const owner = await makeUser();
  const carer = await makeUser();
  const site = await makeSite(owner);
  await addMember(site, carer, "carer");
  const spot = await makeSpot(site, { indoor: false, name: `Bench ${Math.random().toString(36).slice(2, 8)}` });
  const sensor = await makeSensor(site, spot);
  return { owner, carer, site, spot, sensor };
}

async function watch(spotId: number, v: { threshold: number; early: boolean }) {
  const [w] = await db()
    .insert(watches)
    .values({
      spotId,
      kind: "cold",
      threshold: v.threshold,
      durationMinutes: 10,
      hysteresis: 1,
      clearMinutes: 30,
      earlyWarning: v.early,
    })
    .returning();
  return (await getWatch(w.id))!;
}

/** Stores temperatures five minutes apart from `from` and returns them as the spot's points. */
async function readings(sensorId: number, spotId: number, from: number, temps: number[]) {
  const rows = temps.map((temperature, i) => ({
    sensorId,
    measuredAt: new Date(from + i * 5 * MIN),
    temperature,
    humidity: 80,
    lux: null,
    battery: null,
  }));
  await new ReadingWriter().write(rows);
  return spotPoints(spotId, new Date(from - 1), new Date(from + temps.length * 5 * MIN));
}

const evaluator = (clock: Clock) =>
  new Evaluator({ clock, notifier: new Notifier({ clock }), minuteMs: MIN, maxLagMs: 6 * HOUR });
const mailsAbout = (spotName: string) => sunkMail().filter((m) => m.subject.includes(spotName));

describe("evaluator", () => {
  it("opens one event at a cold spell's start, clears it once back for the watch's minutes, e-mails both members each time, on its clock", async () => {
    const h = await household();
    const w = await watch(h.spot.id, { threshold: 10, early: false });
    // 12 °C for 25 minutes, 8 °C for 40, then 13 °C for an hour: below the line from BASE + 25 min.
    const temps = [...Array(5).fill(12), ...Array(8).fill(8), ...Array(12).fill(13)];
    const points = await readings(h.sensor.id, h.spot.id, BASE, temps);
    const clock = fixedClock(BASE + temps.length * 5 * MIN);

    // The machine's clock calls these readings history: nothing happens.
    await evaluator(systemClock).readings([w], points);
    expect(await db().select().from(alertEvents).where(eq(alertEvents.ruleId, w.id))).toEqual([]);

    await evaluator(clock).readings([w], points);
    const events = await db().select().from(alertEvents).where(eq(alertEvents.ruleId, w.id));
    expect(events).toHaveLength(1);
    expect(events[0].startedAt).toEqual(new Date(BASE + 25 * MIN));
    expect(events[0].peak).toBe(8);
    expect(events[0].endedAt).not.toBeNull();
    // Both sent and marked at the clock's instant, not the database's.
    expect(events[0].notifiedAt).toEqual(clock.now());
    expect(events[0].clearNotifiedAt).toEqual(clock.now());
    const mails = mailsAbout(h.spot.name);
    expect(
      mails
        .filter((m) => !m.subject.startsWith("All clear"))
        .map((m) => m.to[0])
        .sort(),
    ).toEqual([h.owner.email, h.carer.email].sort());
    expect(
      mails
        .filter((m) => m.subject.startsWith("All clear"))
        .map((m) => m.to[0])
        .sort(),
    ).toEqual([h.owner.email, h.carer.email].sort());
    const after = await getWatch(w.id);
    expect(after?.evaluatedTo).toEqual(points[points.length - 1].at);
    expect(after?.pendingSince).toBeNull();

    // The same readings again (a resend): the cursor holds, nothing new.
    const sent = sunkMail().length;
    await evaluator(clock).readings([(await getWatch(w.id))!], points);
    expect(await db().select().from(alertEvents).where(eq(alertEvents.ruleId, w.id))).toHaveLength(1);
    expect(sunkMail().length).toBe(sent);
  });

  it("claims an early warning at the clock's instant and sends it once, before any event", async () => {
    const h = await household();
    const w = await watch(h.spot.id, { threshold: 5, early: true });
    // Falling 3 °C an hour for 40 minutes, from 8 °C to 6 °C: the line reaches 5 °C in about 20 minutes.
    const temps = Array.from({ length: 9 }, (_, i) => 8 - i * 0.25);
    const points = await readings(h.sensor.id, h.spot.id, BASE, temps);
    const clock = fixedClock(BASE + 41 * MIN);
    await evaluator(clock).readings([w], points);

    expect((await getWatch(w.id))?.warnedAt).toEqual(clock.now());
    expect(await db().select().from(alertEvents).where(eq(alertEvents.ruleId, w.id))).toEqual([]);
    const early = mailsAbout(h.spot.name).filter((m) => m.subject.startsWith("Early warning"));
    expect(early.map((m) => m.to[0]).sort()).toEqual([h.owner.email, h.carer.email].sort());

    // Still falling ten minutes on: the claim holds, no second warning.
    const more = await readings(h.sensor.id, h.spot.id, BASE + 45 * MIN, [5.9, 5.75]);
    clock.set(BASE + 51 * MIN);
    await evaluator(clock).readings([(await getWatch(w.id))!], more);
    expect(mailsAbout(h.spot.name).filter((m) => m.subject.startsWith("Early warning"))).toHaveLength(2);
  });
});
