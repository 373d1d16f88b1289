// The compare page's months are the site's local months: a spot's rollups are kept by local hour,
// so for a site far from UTC the hours either side of local midnight on the 1st belong to the
// months the grower sees on the clock, not to UTC's.
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { writer } from "~/.server/ingest/writer";
import type { Reading } from "~/domain/ingest/payload";
import { loader as compareLoader } from "~/routes/compare";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

type Month = { key: string; temperature: { lowest: number | null; highest: number | null } };
type Compared = { compared: { months: Month[] }[]; problems: string[] };

describe("compare: months at the site's clock", () => {
  it("files the hours after local midnight on 1 January under January in Auckland (UTC+13 then)", async () => {
    const user = await makeUser();
    // Auckland keeps NZDT (UTC+13) from the last Sunday of September to the first Sunday of April
    // (the IANA time zone database's Pacific/Auckland; the New Zealand Daylight Time Order 2007,
    // from memory), so local 2026-01-01 00:00 is 2025-12-31 11:00 UTC.
    const site = await makeSite(user, { timeZone: "Pacific/Auckland", latitude: -36.85 });
    const spots = [await makeSpot(site), await makeSpot(site)];
    const midnight = Date.UTC(2025, 11, 31, 11, 0);
    for (const spot of spots) {
      const sensor = await makeSensor(site, spot);
      const rows: Reading[] = [];
      // Four hours before local midnight at 30 °C (December), four after at 10 °C (January).
      for (let k = -24; k < 24; k++) {
        rows.push({
          sensorId: sensor.id,
          measuredAt: new Date(midnight + k * 10 * 60_000),
          temperature: k < 0 ? 30 : 10,
          humidity: 60,
          lux: null,
          battery: null,
        });
      }
      await writer().write(rows);
    }
    const token = generateSessionToken();
    await createSession(token, user.id);
    const url = `http://127.0.0.1/sites/${site.id}/compare?from=2026-01&to=2026-01&spots=${spots[0].id}&spots=${spots[1].id}`;
    const out = (await compareLoader({
      request: new Request(url, { headers: { Cookie: `nw_session=${token}` } }),
      params: { siteId: String(site.id) },
      context: {},
    } as never)) as Compared;
    expect(out.problems).toEqual([]);
    for (const c of out.compared) {
      const withData = c.months.filter((m) => m.temperature.lowest != null);
      expect(withData.map((m) => m.key)).toEqual(["2026-01"]);
      expect(withData[0].temperature).toMatchObject({ lowest: 10, highest: 10 });
    }
  });
});
