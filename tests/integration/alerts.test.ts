// The alert path end to end: the real writer commits readings from the simulator's cold-front
// scenario, the engine evaluates each committed batch with its state in PostgreSQL, and e-mails
// go through nodemailer to an SMTP sink on loopback.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { startAlerts, type RunningAlerts } from "~/.server/alerts/engine";
import { ReadingWriter } from "~/.server/ingest/writer";
import { configureMailer, startMailSink, sunkMail, type SunkMail } from "~/.server/mail";
import { evaluate } from "~/domain/alerts/rules";
import { coldFrontScenario, DEMO_SITE, generate } from "../../simulator/model";
import { addMember, makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const MIN = 60_000;
const HOUR = 3_600_000;
const OUTDOOR = { kind: "outdoor", facing: "none", hasLight: true } as const;

let sink: { port: number; close: () => Promise<void> };
let writer: ReadingWriter;
let alerts: RunningAlerts;

beforeAll(async () => {
  sink = await startMailSink({ port: 0 });
  configureMailer(`smtp://127.0.0.1:${sink.port}`);
  writer = new ReadingWriter();
  alerts = await start();
});

afterAll(async () => {
  await alerts?.();
  await sink?.close();
});

// History is fed as if live: nothing is too old, and the timer is driven by hand.
const start = () => startAlerts(writer, { maxLagMs: Number.POSITIVE_INFINITY, checkEveryMs: 3_600_000 });

/** The text/plain part of a sunk message, decoded (nodemailer writes quoted-printable or base64). */
function plain(m: SunkMail): string {
  const part = m.raw.split(/\r?\n--/).find((p) => /Content-Type: text\/plain/i.test(p)) ?? m.raw;
  const [head, ...body] = part.split(/\r?\n\r?\n/);
  const text = body.join("\n\n");
  if (/Content-Transfer-Encoding: base64/i.test(head))
    return Buffer.from(text.replace(/\s+/g, ""), "base64").toString("utf8");
  if (/Content-Transfer-Encoding: quoted-printable/i.test(head)) {
    const bytes = text
      .replace(/=\r?\n/g, "")
      .replace(/=([0-9A-F]{2})/gi, (_m, h: string) => String.fromCharCode(parseInt(h, 16)));
    return Buffer.from(bytes, "latin1").toString("utf8");
  }
  return text;
}

async function household() {
  const owner = await makeUser();
  const carer = await makeUser();
  const site = await makeSite(owner);
  await addMember(site, carer, "carer");
  const spot = await makeSpot(site, { indoor: false, name: `Bench ${Math.random().toString(36).slice(2, 8)}` });
  const sensor = await makeSensor(site, spot);
  return { owner, carer, site, spot, sensor };
}

async function coldWatch(
  spotId: number,
  extra: Partial<{ kind: string; threshold: number; duration: number; early: boolean }> = {},
) {
  const res = await pool().query<{ id: number }>(
    `INSERT INTO watches (spot_id, kind, threshold, duration_minutes, hysteresis, clear_minutes, early_warning)
     VALUES ($1, $2, $3, $4, 1, 30, $5) RETURNING id`,
    [spotId, extra.kind ?? "cold", extra.threshold ?? 10, extra.duration ?? 10, extra.early ?? true],
  );
  return res.rows[0].id;
}

type Row = { measuredAt: Date; temperature: number; humidity: number };

/** Writes readings a few at a time, the way a live sensor's batches arrive, waiting for the engine. */
async function feed(sensorId: number, rows: Row[], chunk = 3, after?: (fed: Row[]) => void) {
  for (let i = 0; i < rows.length; i += chunk) {
    const part = rows.slice(i, i + chunk);
    await writer.write(
      part.map((r) => ({
        sensorId,
        measuredAt: r.measuredAt,
        temperature: r.temperature,
        humidity: r.humidity,
        lux: null,
        battery: 80,
      })),
    );
    await alerts.engine.idle();
    after?.(rows.slice(0, i + chunk));
  }
}

const mailsFor = (spotName: string) => sunkMail().filter((m) => m.subject.includes(spotName));
const series = (from: number, values: number[], stepMin = 5): Row[] =>
  values.map((temperature, i) => ({ measuredAt: new Date(from + i * stepMin * MIN), temperature, humidity: 80 }));

describe("cold snap from the simulated front", () => {
  it("sends one early warning before the crossing, one cold-snap e-mail per member, then one all-clear", async () => {
    const { owner, carer, spot, sensor } = await household();
    await coldWatch(spot.id);
    // An evening front, as the grower's worst night goes: 18:00 UTC is after dark in December.
    const d = new Date(Date.now() - 2 * 24 * HOUR);
    const from = Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), 16);
    const front = new Date(from + 2 * HOUR);
    const rows = [
      ...generate(DEMO_SITE, OUTDOOR, coldFrontScenario(front), {
        from: new Date(from),
        to: new Date(from + 11 * HOUR),
        intervalMs: 5 * MIN,
        sensorSeed: 101,
      }),
    ];

    let lowestWhenWarned: number | null = null;
    await feed(sensor.id, rows, 1, (fed) => {
      if (lowestWhenWarned === null && mailsFor(spot.name).some((m) => m.subject.startsWith("Early warning"))) {
        lowestWhenWarned = Math.min(...fed.map((r) => r.temperature));
      }
    });

    const mails = mailsFor(spot.name);
    const early = mails.filter((m) => m.subject.startsWith("Early warning"));
    const cold = mails.filter((m) => m.subject.startsWith("Cold snap"));
    const clear = mails.filter((m) => m.subject.startsWith("All clear"));
    expect(early.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email].sort());
    expect(lowestWhenWarned).not.toBeNull();
    expect(lowestWhenWarned!).toBeGreaterThanOrEqual(10);
    expect(plain(early[0])).toMatch(/At this rate it reaches 10\.0 °C in (about \d+ minutes|a few minutes)/);

    expect(cold.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email].sort());
    expect(clear.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email].sort());
    expect(mails).toHaveLength(6);

    // The numbers: the state machine on the same readings says when it opened; the minimum so far then.
    const pts = rows.map((r) => ({ at: r.measuredAt, value: r.temperature }));
    const { transitions } = evaluate(
      { kind: "cold", threshold: 10, durationMinutes: 10, hysteresis: 1, clearMinutes: 30 },
      { pendingSince: null, clearingSince: null, open: null },
      pts,
    );
    const openedAt = transitions[0].at.getTime();
    const lowestAtOpen = Math.min(...pts.filter((p) => p.at.getTime() <= openedAt).map((p) => p.value));
    const lowest = Math.min(...pts.map((p) => p.value));
    const text = plain(cold[0]);
    expect(cold[0].subject).toContain(spot.name);
    expect(cold[0].subject).toContain("below your 10.0 °C watch");
    expect(text).toContain(`lowest so far ${lowestAtOpen.toFixed(1)} °C`);
    expect(text).toContain(`/sites/${spot.siteId}/spots/${spot.id}`);
    expect(text).toMatch(/Bring tender plants indoors/);
    expect(text).toMatch(/help, not a guarantee/);
    expect(plain(clear[0])).toContain(`the lowest was ${lowest.toFixed(1)} °C`);
    expect(cold[0].raw).toMatch(/Content-Type: text\/html/i);

    const events = await pool().query(
      `SELECT started_at, ended_at, peak, notified_at, clear_notified_at FROM alert_events WHERE spot_id = $1`,
      [spot.id],
    );
    expect(events.rows).toHaveLength(1);
    expect(events.rows[0].peak).toBeCloseTo(lowest, 4);
    expect(events.rows[0].ended_at).not.toBeNull();
    expect(events.rows[0].clear_notified_at).not.toBeNull();
  });

  it("a reading oscillating around the threshold sends no extra mail", async () => {
    const { spot, sensor } = await household();
    await coldWatch(spot.id, { early: false });
    const from = Date.now() - 8 * HOUR;
    const values = [
      12,
      12,
      12,
      9.5,
      9.4,
      9.3,
      9.2,
      ...Array.from({ length: 72 }, (_, i) => (i % 2 === 0 ? 10.4 : 9.6)),
    ];
    await feed(sensor.id, series(from, values), 2);
    const mails = mailsFor(spot.name);
    expect(mails.filter((m) => m.subject.startsWith("Cold snap"))).toHaveLength(2);
    expect(mails).toHaveLength(2);
  });

  it("a restart during an open event sends nothing twice, and the all-clear still comes once", async () => {
    const { owner, carer, spot, sensor } = await household();
    const ruleId = await coldWatch(spot.id, { early: false });
    const from = Date.now() - 8 * HOUR;
    await feed(sensor.id, series(from, [12, 12, 8, 8, 8, 8, 8]));
    expect(mailsFor(spot.name)).toHaveLength(2);
    expect(ruleId).toBeGreaterThan(0);

    await alerts();
    alerts = await start();
    await feed(sensor.id, series(from + 35 * MIN, [7.5, 7, 7.2, 8, 8.5]));
    expect(mailsFor(spot.name)).toHaveLength(2);

    // A crash between the claim and the send of the second member: on restart only that member gets it.
    const silentRule = await coldWatch(spot.id, { kind: "silent", threshold: 600, duration: 0 });
    const ev = await pool().query<{ id: number }>(
      `INSERT INTO alert_events (rule_id, spot_id, kind, started_at, peak) VALUES ($1, $2, 'silent', now() - interval '2 hours', 120) RETURNING id`,
      [silentRule, spot.id],
    );
    await pool().query(`INSERT INTO alert_deliveries (event_id, user_id, message) VALUES ($1, $2, 'open')`, [
      ev.rows[0].id,
      owner.id,
    ]);
    await alerts();
    alerts = await start();
    const resent = mailsFor(spot.name).filter((m) => m.subject.startsWith("Silent"));
    expect(resent.map((m) => m.to[0])).toEqual([carer.email]);
    await pool().query(`DELETE FROM watches WHERE id = $1`, [silentRule]);

    await feed(sensor.id, series(from + 60 * MIN, Array(10).fill(12)));
    const clear = mailsFor(spot.name).filter((m) => m.subject.startsWith("All clear"));
    expect(clear.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email].sort());
    const events = await pool().query(`SELECT count(*)::int AS n FROM alert_events WHERE spot_id = $1`, [spot.id]);
    expect(events.rows[0].n).toBe(1);
  });

  it("a silent sensor raises one alert, saying why it matters on a cold night, and clears when it speaks", async () => {
    const { spot, sensor } = await household();
    await coldWatch(spot.id, { kind: "silent", threshold: 60, duration: 0 });
    await feed(sensor.id, series(Date.now() - 2 * HOUR, [6]));
    await alerts.engine.checkSilence();
    await alerts.engine.checkSilence();
    const silent = mailsFor(spot.name).filter((m) => m.subject.startsWith("Silent sensor"));
    expect(silent).toHaveLength(2);
    expect(plain(silent[0])).toContain("A silent sensor on a cold night is the dangerous case");
    expect(plain(silent[0])).toContain("at 6.0 °C");

    await feed(sensor.id, series(Date.now() - 1000, [6.2]));
    expect(mailsFor(spot.name).filter((m) => m.subject.startsWith("All clear"))).toHaveLength(2);
    await alerts.engine.checkSilence();
    expect(mailsFor(spot.name)).toHaveLength(4);
  });

  it("no early warning and no alert on noise just above the threshold", async () => {
    const { spot, sensor } = await household();
    await coldWatch(spot.id);
    let s = 11;
    const rand = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
    const from = Date.now() - 6 * HOUR;
    await feed(
      sensor.id,
      series(
        from,
        Array.from({ length: 72 }, () => 10.7 + 0.5 * rand()),
      ),
      4,
    );
    expect(mailsFor(spot.name)).toEqual([]);
  });

  it("a second sensor's late readings from inside a cleared event neither reopen it nor start an overlapping one", async () => {
    const { owner, carer, site, spot, sensor } = await household();
    const late = await makeSensor(site, spot);
    const ruleId = await coldWatch(spot.id, { early: false });
    const from = Date.now() - 8 * HOUR;
    // 8 °C for an hour, then back to 12 °C long enough for the all-clear.
    await feed(sensor.id, series(from, [12, ...Array(12).fill(8), ...Array(10).fill(12)]));
    const firstRound = mailsFor(spot.name);
    expect(firstRound.filter((m) => m.subject.startsWith("Cold snap"))).toHaveLength(2);
    expect(firstRound.filter((m) => m.subject.startsWith("All clear"))).toHaveLength(2);
    // The other sensor's cold readings of that hour come in after a reconnect, out of order.
    await feed(late.id, series(from + 10 * MIN, Array(10).fill(7)).reverse(), 4);
    const events = await pool().query<{ started_at: Date; ended_at: Date | null }>(
      `SELECT started_at, ended_at FROM alert_events WHERE rule_id = $1`,
      [ruleId],
    );
    expect(events.rows).toHaveLength(1);
    expect(events.rows[0].ended_at).not.toBeNull();
    const clear = mailsFor(spot.name).filter((m) => m.subject.startsWith("All clear"));
    expect(clear.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email].sort());
    expect(mailsFor(spot.name)).toHaveLength(4);
  });

  it("readings let go of under pressure are re-read from the database from the rule's cursor", async () => {
    await alerts();
    alerts = await startAlerts(writer, { maxLagMs: Number.POSITIVE_INFINITY, checkEveryMs: 3_600_000, maxPending: 0 });
    try {
      const { owner, carer, spot, sensor } = await household();
      await coldWatch(spot.id, { early: false });
      await feed(sensor.id, series(Date.now() - 8 * HOUR, [12, 12, 8, 8, 8, 8, 8, 12, 12, 12, 12, 12, 12, 12, 12]));
      const subjects = mailsFor(spot.name)
        .map((m) => `${m.subject.split(" ")[0]} ${m.to[0]}`)
        .sort();
      expect(subjects).toEqual(
        [`All ${carer.email}`, `All ${owner.email}`, `Cold ${carer.email}`, `Cold ${owner.email}`].sort(),
      );
    } finally {
      await alerts();
      alerts = await start();
    }
  });

  it("readings committed while no engine listened are evaluated when it starts again", async () => {
    const { spot, sensor } = await household();
    const ruleId = await coldWatch(spot.id, { early: false });
    const from = Date.now() - 8 * HOUR;
    await feed(sensor.id, series(from, [12, 12]));
    await alerts();
    await writer.write(
      series(from + 10 * MIN, Array(6).fill(8)).map((r) => ({
        sensorId: sensor.id,
        measuredAt: r.measuredAt,
        temperature: r.temperature,
        humidity: r.humidity,
        lux: null,
        battery: 80,
      })),
    );
    alerts = await start();
    await alerts.engine.idle();
    expect(mailsFor(spot.name).filter((m) => m.subject.startsWith("Cold snap"))).toHaveLength(2);
    const rule = await pool().query<{ evaluated_to: Date }>(`SELECT evaluated_to FROM watches WHERE id = $1`, [ruleId]);
    expect(rule.rows[0].evaluated_to.getTime()).toBe(from + 35 * MIN);
  });

  it("history older than the engine's horizon (a CSV of last winter) raises nothing", async () => {
    const { spot, sensor } = await household();
    await coldWatch(spot.id);
    await alerts();
    alerts = await startAlerts(writer, { checkEveryMs: 3_600_000 });
    await feed(sensor.id, series(Date.now() - 30 * 24 * HOUR, Array(20).fill(2)), 20);
    expect(mailsFor(spot.name)).toEqual([]);
    await alerts();
    alerts = await start();
  });
});
