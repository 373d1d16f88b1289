// The broker's sensor cache: a busy sensor costs no query per message, a lapsed entry is refreshed
// by one query while its messages keep flowing, and an invalidation is never undone by a query
// that started before it.
import { afterEach, describe, expect, it, vi } from "vitest";
import { pool } from "~/.server/db";
import {
  cachedSensorInfo,
  invalidateSensorCache,
  MAX_UNKNOWN_IDS,
  sensorInfo,
  unknownSensorIdsCached,
  UNKNOWN_TTL_MS,
} from "~/.server/ingest/sensor-cache";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

/** Counts the cache's own queries (the one that reads a sensor's secret hash). */
function countLookups() {
  const p = pool();
  const query = p.query.bind(p);
  let n = 0;
  vi.spyOn(p, "query").mockImplementation(((text: unknown, ...rest: unknown[]) => {
    if (typeof text === "string" && text.includes("secret_hash")) n++;
    return (query as (...a: unknown[]) => unknown)(text, ...rest);
  }) as typeof p.query);
  return () => n;
}

const settle = () => new Promise((r) => setTimeout(r, 100));

afterEach(() => vi.restoreAllMocks());

describe("sensor cache", () => {
  it("answers many messages of a sensor that is not cached yet with one query", async () => {
    const site = await makeSite(await makeUser());
    const sensor = await makeSensor(site, await makeSpot(site, { indoor: false }));
    invalidateSensorCache(sensor.id);
    const lookups = countLookups();
    const infos = await Promise.all(Array.from({ length: 50 }, () => sensorInfo(sensor.id)));
    expect(lookups()).toBe(1);
    expect(new Set(infos.map((i) => i?.kind))).toEqual(new Set(["outdoor"]));
    expect(cachedSensorInfo(sensor.id)?.siteId).toBe(site.id);
  });

  it("keeps serving a lapsed entry while one query refreshes it", async () => {
    const site = await makeSite(await makeUser());
    const sensor = await makeSensor(site, await makeSpot(site));
    await sensorInfo(sensor.id);
    const lookups = countLookups();
    const now = Date.now();
    vi.spyOn(Date, "now").mockReturnValue(now + 11_000); // past the 10 s lifetime
    for (let i = 0; i < 500; i++) expect(cachedSensorInfo(sensor.id)?.id).toBe(sensor.id);
    await settle();
    expect(lookups()).toBe(1);
    // Refreshed: no further query while the new entry is fresh.
    for (let i = 0; i < 500; i++) cachedSensorInfo(sensor.id);
    await settle();
    expect(lookups()).toBe(1);
  });

  it("does not store what a query read before the sensor was invalidated", async () => {
    const site = await makeSite(await makeUser());
    const sensor = await makeSensor(site, await makeSpot(site));
    await sensorInfo(sensor.id);
    vi.spyOn(Date, "now").mockReturnValue(Date.now() + 11_000);
    cachedSensorInfo(sensor.id); // starts a refresh that reads the sensor as it is now
    await pool().query("DELETE FROM sensors WHERE id = $1", [sensor.id]);
    invalidateSensorCache(sensor.id); // what deleting a sensor in the app does
    await settle();
    expect(cachedSensorInfo(sensor.id)).toBeUndefined();
    expect(await sensorInfo(sensor.id)).toBeNull();
  });

  it("remembers ids that are no sensor for a short while and only so many, so made-up ids cannot grow memory", async () => {
    const top = (await pool().query<{ id: number }>("SELECT coalesce(max(id), 0)::int AS id FROM sensors")).rows[0].id;
    const first = top + 1_000_000;
    const n = MAX_UNKNOWN_IDS + 500;
    for (let i = 0; i < n; i += 500) {
      await Promise.all(Array.from({ length: 500 }, (_, k) => sensorInfo(first + i + k)));
    }
    expect(unknownSensorIdsCached()).toBe(MAX_UNKNOWN_IDS);
    // A retry with an unknown id costs no query while it is remembered.
    const lookups = countLookups();
    expect(await sensorInfo(first + n - 1)).toBeNull();
    expect(cachedSensorInfo(first + n - 1)).toBeNull();
    expect(lookups()).toBe(0);
    // Past its time, "no such sensor" is asked again (a sensor may have been added meanwhile) and
    // a lapsed entry is dropped, not served.
    const now = Date.now();
    vi.spyOn(Date, "now").mockReturnValue(now + UNKNOWN_TTL_MS + 1);
    expect(cachedSensorInfo(first + n - 1)).toBeUndefined();
    expect(await sensorInfo(first + n - 2)).toBeNull();
    expect(lookups()).toBe(1);
    // Ids beyond PostgreSQL's integer are never asked about, nor remembered.
    const before = unknownSensorIdsCached();
    expect(await sensorInfo(99_999_999_999)).toBeNull();
    expect(lookups()).toBe(1);
    expect(unknownSensorIdsCached()).toBe(before);
  });
});
