// The silent-sensor watch counts from when a sensor could have spoken in the spot: a placement dated
// back to a logger's past year is not "nothing for 16,000 hours".
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startAlerts, type RunningAlerts } from "~/.server/alerts/engine";
import { pool } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { configureMailer, startMailSink } from "~/.server/mail";
import { placeSensor } from "~/.server/placements";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

let sink: { port: number; close: () => Promise<void> };
let alerts: RunningAlerts;
const writer = new ReadingWriter();

beforeAll(async () => {
  sink = await startMailSink({ port: 0 });
  configureMailer(`smtp://127.0.0.1:${sink.port}`);
  alerts = await startAlerts(writer, { maxLagMs: Number.POSITIVE_INFINITY, checkEveryMs: 3_600_000 });
});

afterAll(async () => {
  await alerts?.();
  await sink?.close();
});

async function watchedBench() {
  const user = await makeUser();
  const site = await makeSite(user);
  const spot = await makeSpot(site, { indoor: false });
  await pool().query(
    `INSERT INTO watches (spot_id, kind, threshold, duration_minutes, hysteresis, clear_minutes) VALUES ($1, 'silent', 60, 0, 0, 0)`,
    [spot.id],
  );
  return { user, site, spot };
}

const silences = async (spotId: number) =>
  (
    await pool().query<{ peak: number }>(`SELECT peak FROM alert_events WHERE spot_id = $1 AND kind = 'silent'`, [
      spotId,
    ])
  ).rows;

describe("silent-sensor watch and placements dated back", () => {
  it("a logger placed from its past year, and a sensor placed from last month that never reported, open no silence", async () => {
    const { user, site, spot } = await watchedBench();
    const logger = await makeSensor(site);
    const yearAgo = Math.floor((Date.now() - 400 * DAY) / HOUR) * HOUR;
    await writer.write(
      Array.from({ length: 24 * 30 }, (_, i) => ({
        sensorId: logger.id,
        measuredAt: new Date(yearAgo + i * HOUR),
        temperature: 8,
        humidity: 80,
        lux: null,
        battery: null,
      })),
    );
    await placeSensor({
      siteId: site.id,
      sensorId: logger.id,
      spotId: spot.id,
      at: new Date(yearAgo),
      actorId: user.id,
    });
    const quiet = await watchedBench();
    const fresh = await makeSensor(quiet.site);
    await placeSensor({
      siteId: quiet.site.id,
      sensorId: fresh.id,
      spotId: quiet.spot.id,
      at: new Date(Date.now() - 30 * DAY),
      actorId: quiet.user.id,
    });

    await alerts.engine.checkSilence();
    expect(await silences(spot.id)).toEqual([]);
    expect(await silences(quiet.spot.id)).toEqual([]);

    // Two hours after the placement was made with nothing new, the watch speaks, counting from then.
    await pool().query(`UPDATE placements SET created_at = now() - interval '2 hours' WHERE spot_id = $1`, [spot.id]);
    await alerts.engine.checkSilence();
    const [event] = await silences(spot.id);
    expect(event.peak).toBeGreaterThanOrEqual(119);
    expect(event.peak).toBeLessThan(24 * 60);
  });
});
