// Forecast warnings end to end: the weather job fetches from the local fake (with a scripted frosty
// night in its forecast), two weeks of simulated readings go through the real writer, the warning
// pass runs the forecast through each spot's model and e-mails through nodemailer to the SMTP sink.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fixedClock } from "~/.server/alerts/clock";
import { Notifier } from "~/.server/alerts/notifier";
import { ForecastWarnings, openForecastWarnings } from "~/.server/alerts/forecast";
import { alertBanner } from "~/.server/alerts/pages";
import { pool } from "~/.server/db";
import { projectedProfile } from "~/.server/projections";
import { sunkMail, type SunkMail } from "~/.server/mail";
import { WeatherJob } from "~/.server/weather/job";
import { FORECAST_CAUTION, forecastHeadline } from "~/domain/alerts/forecast-warning";
import { DEMO_SITE, type SimSpot } from "../../simulator/model";
import { startWeatherFake, type WeatherFake } from "../../simulator/weather-fake";
import { addMember, makeSite, makeUser, simulatedSpot, useMailSink } from "./helpers";

const HOUR = 3_600_000;
// Tuesday 15 September 2026, 20:00 in London (BST): a mild time of year, so only the scripted front
// brings a night near a Cymbidium's 2 °C damage line (library.ts, LIMITS: AOS sheet, memory).
const NOW = Date.UTC(2026, 8, 15, 19, 0);
// The front: from 18:00 UTC on Wednesday 16 September the air falls 14 °C in 3 h and stays down 8 h,
// so Wednesday night's lowest hour is 26–34 h ahead (inside the 12–48 h window).
const FRONT = { start: new Date(Date.UTC(2026, 8, 16, 18, 0)), dropC: 14, hours: 8 };

useMailSink();
let frosty: WeatherFake;
let site: Awaited<ReturnType<typeof makeSite>>;
let owner: Awaited<ReturnType<typeof makeUser>>;
let carer: Awaited<ReturnType<typeof makeUser>>;
let mentor: Awaited<ReturnType<typeof makeUser>>;
let keenMentor: Awaited<ReturnType<typeof makeUser>>;

const endpoints = (f: WeatherFake) => ({
  archiveUrl: `${f.url}/v1/archive`,
  forecastUrl: `${f.url}/v1/forecast`,
  timeoutMs: 5000,
});

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

async function spotWithDays(
  name: string,
  sim: SimSpot,
  indoor: boolean,
  seed: number,
  plantKey: string,
  at = NOW,
  where = site,
) {
  const spot = await simulatedSpot(where, sim, { days: 16, seed, now: new Date(at), indoor, name });
  await pool().query(`INSERT INTO spot_plants (spot_id, plant_key) VALUES ($1, $2)`, [spot.id, plantKey]);
  return spot;
}

let bench: { id: number; name: string };
let study: { id: number; name: string };

beforeAll(async () => {
  await pool().query(`SELECT ensure_reading_partitions('2026-08-01'::timestamptz, 3)`);
  frosty = await startWeatherFake({ now: () => NOW, coldFront: FRONT });
  owner = await makeUser();
  carer = await makeUser();
  mentor = await makeUser();
  site = await makeSite(owner, { latitude: DEMO_SITE.latitude });
  await addMember(site, carer, "carer");
  await addMember(site, mentor, "mentor");
  // A mentor who ticked cold-snap alerts on the site's Alerts page hears of forecast frost too.
  keenMentor = await makeUser();
  await addMember(site, keenMentor, "mentor");
  await pool().query(`INSERT INTO alert_preferences (user_id, site_id, email, kinds) VALUES ($1, $2, true, $3)`, [
    keenMentor.id,
    site.id,
    ["cold", "silent"],
  ]);
  await new WeatherJob({ endpoints: endpoints(frosty), years: 1, perRound: 50, now: () => NOW }).untilIdle();
  bench = await spotWithDays(
    "Bench by the wall",
    { kind: "outdoor", facing: "none", hasLight: false },
    false,
    101,
    "cymbidium",
  );
  study = await spotWithDays(
    "Study, heated",
    { kind: "heated-room", facing: "S", hasLight: false },
    true,
    104,
    "phalaenopsis",
  );
}, 120_000);
afterAll(() => frosty?.close());

const mailsAbout = (spotName: string) => sunkMail().filter((m) => m.subject.includes(spotName));

describe("forecast warnings", () => {
  it("warns owner and carer once, by e-mail and in the app, of a frost night 30 h ahead on a bench with a Cymbidium; a heated room gets none", async () => {
    // The e-mails go through the alerts' one outbox, the notifier the engine's events use.
    const posted: { source: string; to: string; subject: string }[] = [];
    const notifier = new Notifier({
      clock: fixedClock(NOW),
      onSent: (letter, to, mail) => posted.push({ source: letter.source, to: to.email, subject: mail.subject }),
    });
    const runner = new ForecastWarnings({ notifier });
    const result = await runner.run(site.id);
    expect(result.warned).toBe(1);

    const mails = mailsAbout(bench.name);
    expect(posted.map((p) => ({ ...p, to: [p.to] }))).toEqual(
      mails.map((m) => ({ source: "forecast", to: m.to, subject: m.subject })),
    );
    // Claimed on the row at the outbox clock's instant.
    const claimed = await pool().query<{ notified_at: Date }>(
      `SELECT notified_at FROM forecast_warnings WHERE spot_id = $1`,
      [bench.id],
    );
    expect(claimed.rows[0].notified_at).toEqual(new Date(NOW));
    // Owner, carer and the mentor who opted in; not the mentor who left cold-snap alerts unticked (the default for mentors).
    expect(mails.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email, keenMentor.email].sort());
    const text = plain(mails[0]);
    expect(mails[0].subject).toMatch(
      /^Cold night forecast for Bench by the wall: Wednesday night may reach -?\d+\.\d °C$/,
    );
    expect(text).toMatch(
      /Wednesday night \(16 Sep\): -?\d+\.\d °C expected on Bench by the wall; the Cymbidium's limit is 2\.0 °C — bring it in\./,
    );
    expect(text).toContain(FORECAST_CAUTION);
    expect(text).toContain(`/sites/${site.id}/spots/${bench.id}`);

    const stored = await pool().query<{ night: string; likely_c: number; low_at: Date }>(
      `SELECT to_char(night, 'YYYY-MM-DD') AS night, likely_c, low_at FROM forecast_warnings WHERE spot_id = $1`,
      [bench.id],
    );
    expect(stored.rows).toHaveLength(1);
    expect(stored.rows[0].night).toBe("2026-09-16");
    expect(stored.rows[0].likely_c).toBeLessThanOrEqual(2);
    const ahead = (stored.rows[0].low_at.getTime() - NOW) / HOUR;
    expect(ahead).toBeGreaterThanOrEqual(12);
    expect(ahead).toBeLessThanOrEqual(48);

    const inApp = await openForecastWarnings(site.id, new Date(NOW));
    expect(inApp).toHaveLength(1);
    expect(inApp[0].spotId).toBe(bench.id);
    // The site's alert banner (every site page) carries it.
    expect((await alertBanner(site.id, new Date(NOW))).forecast.map((f) => f.id)).toEqual([inApp[0].id]);
    expect(forecastHeadline(inApp[0], "F")).toMatch(
      /^Wednesday night \(16 Sep\): -?\d+\.\d °F expected on Bench by the wall; the Cymbidium's limit is 35\.6 °F — bring it in\.$/,
    );

    // The heated room with a Phalaenopsis (damage line 10 °C): September's readings show no heating
    // yet, so its model follows the weather loosely, and the frost outside stays far from 10 °C in it.
    expect(mailsAbout(study.name)).toHaveLength(0);
    expect((await pool().query(`SELECT 1 FROM forecast_warnings WHERE spot_id = $1`, [study.id])).rowCount).toBe(0);
  });

  it("sends nothing new when run again on the same forecast, or an hour later", async () => {
    const before = sunkMail().length;
    expect((await new ForecastWarnings({ clock: fixedClock(NOW) }).run(site.id)).warned).toBe(0);
    expect((await new ForecastWarnings({ clock: fixedClock(NOW + HOUR) }).run()).warned).toBe(0);
    expect(sunkMail().length).toBe(before);
  });

  it("sends the all-clear when a later forecast no longer crosses the line, and the in-app warning goes", async () => {
    const later = NOW + 3 * HOUR + 60_000;
    const mild = await startWeatherFake({ now: () => later });
    try {
      await new WeatherJob({ endpoints: endpoints(mild), years: 1, perRound: 50, now: () => later }).untilIdle();
      const result = await new ForecastWarnings({ clock: fixedClock(later) }).run(site.id);
      expect(result.cleared).toBe(1);
      expect(result.warned).toBe(0);
    } finally {
      await mild.close();
    }
    const clears = mailsAbout(bench.name).filter((m) => m.subject.startsWith("All clear"));
    expect(clears.map((m) => m.to[0]).sort()).toEqual([owner.email, carer.email, keenMentor.email].sort());
    expect(clears[0].subject).toBe("All clear: Wednesday night no longer looks too cold at Bench by the wall");
    const text = plain(clears[0]);
    expect(text).toContain("no longer looks likely to fall under the Cymbidium's 2.0 °C limit");
    expect(text).toContain(FORECAST_CAUTION);
    expect(await openForecastWarnings(site.id, new Date(later))).toHaveLength(0);
    expect((await alertBanner(site.id, new Date(later))).forecast).toHaveLength(0);
    // And again: nothing more.
    const before = sunkMail().length;
    await new ForecastWarnings({ clock: fixedClock(later) }).run(site.id);
    expect(sunkMail().length).toBe(before);
  });

  it("looks past a heated room in winter, whose readings show its heating floor, even under a frost forecast", async () => {
    // Tuesday 20 January 2026, 19:00 UTC; the front's night is Wednesday 21 January.
    const winter = Date.UTC(2026, 0, 20, 19, 0);
    await pool().query(`SELECT ensure_reading_partitions('2025-12-01'::timestamptz, 2)`);
    const front = await startWeatherFake({
      now: () => winter,
      coldFront: { start: new Date(Date.UTC(2026, 0, 21, 18)), dropC: 14, hours: 8 },
    });
    try {
      const home = await makeSite(owner, { latitude: DEMO_SITE.latitude + 0.01 });
      await new WeatherJob({ endpoints: endpoints(front), years: 1, perRound: 50, now: () => winter }).untilIdle();
      const room = await spotWithDays(
        "Winter study",
        { kind: "heated-room", facing: "S", hasLight: false },
        true,
        104,
        "phalaenopsis",
        winter,
        home,
      );
      expect((await projectedProfile(room.id, { now: new Date(winter) }))?.model?.heatingFloor).toBe(true);
      const before = sunkMail().length;
      await new ForecastWarnings({ clock: fixedClock(winter) }).run(home.id);
      expect(sunkMail().length).toBe(before);
      expect((await pool().query(`SELECT 1 FROM forecast_warnings WHERE spot_id = $1`, [room.id])).rowCount).toBe(0);
    } finally {
      await front.close();
    }
  });
});
