// The import page's action end to end (session, multipart body, answer): preview lines, the
// placement warning and its link, the audit row of an import, one run per grower at a time.
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken, SESSION_COOKIE } from "~/.server/auth";
import { db } from "~/.server/db";
import { csvSlot } from "~/.server/ingest/csv-import";
import { auditLog } from "~/db/schema.server";
import { action } from "~/routes/import";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

async function setup() {
  const owner = await makeUser();
  const site = await makeSite(owner, { timeZone: "Europe/Madrid" });
  const spot = await makeSpot(site);
  const sensor = await makeSensor(site, spot, new Date("2025-10-26T00:00:00Z"));
  const token = generateSessionToken();
  await createSession(token, owner.id);
  return { owner, site, sensor, token };
}

function post(siteId: number, token: string, csv: string, fields: Record<string, string>) {
  const form = new FormData();
  form.set("file", new File([csv], "logger.csv", { type: "text/csv" }));
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  const request = new Request(`http://127.0.0.1/sites/${siteId}/import`, {
    method: "POST",
    headers: { Cookie: `${SESSION_COOKIE}=${token}` },
    body: form,
  });
  return action({ request, params: { siteId: String(siteId) } } as never) as Promise<unknown>;
}

/** The action's answer as { status, body }, whether it returned data() or a plain object. */
function answer(res: unknown): { status: number; body: Record<string, unknown> } {
  const r = res as { type?: string; data?: unknown; init?: { status?: number } };
  if (r && r.type === "DataWithResponseInit")
    return { status: r.init?.status ?? 200, body: r.data as Record<string, unknown> };
  return { status: 200, body: res as Record<string, unknown> };
}

// Madrid: CEST until 03:00 on 26 October 2025, when clocks go back to 02:00 CET (EU Directive
// 2000/84/EC); the sensor was placed at 02:00 CEST (00:00Z) that night.
const CSV =
  "Time,Temperature\n" +
  "2025-10-26 01:30,15\n" + // 23:30Z on the 25th: before the placement
  "\n" +
  "2025-10-26 02:00,oops\n" +
  "2025-10-26 02:30,14\n" +
  "2025-10-26 02:00,14\n" + // the repeat, after the clock went back
  "2025-10-26 02:30,13\n";

describe("the import page's action", () => {
  it("previews by file line, says how the repeated hour was read, and links rows before the placement to the sensor page", async () => {
    const { site, sensor, token } = await setup();
    const { status, body } = answer(
      await post(site.id, token, CSV, {
        intent: "preview",
        sensorId: String(sensor.id),
        dateFormat: "iso",
        timeZone: "Europe/Madrid",
      }),
    );
    expect(status).toBe(200);
    const preview = body.preview as {
      rows: { line: number }[];
      failed: { line: number }[];
      dstChanges: string[];
      beforeFirstPlacement: number;
      sensorPage: string;
    };
    expect(preview.rows.map((r) => r.line)).toEqual([2, 5, 6, 7]);
    expect(preview.failed.map((f) => f.line)).toEqual([4]);
    expect(preview.dstChanges).toEqual([
      // The row with a bad temperature counts too: its time was read before the row was refused.
      "4 rows in the repeated hour of 26 October 2025 were read in " +
        "file order: 2 rows as the first occurrence, UTC+02:00, then 2 " +
        "rows after the clock went back as the second, UTC+01:00.",
    ]);
    expect(preview.beforeFirstPlacement).toBe(1);
    expect(preview.sensorPage).toBe(`/sites/${site.id}/sensors/${sensor.id}#placements`);
  });

  it("imports, counts the reading in no spot, and writes one audit row", async () => {
    const { owner, site, sensor, token } = await setup();
    const { status, body } = answer(
      await post(site.id, token, CSV, {
        intent: "import",
        sensorId: String(sensor.id),
        dateFormat: "iso",
        timeZone: "Europe/Madrid",
      }),
    );
    expect(status).toBe(200);
    expect(body.imported).toMatchObject({ rows: 5, stored: 4, failed: 1, outsideSpots: 1 });
    const audit = await db().select().from(auditLog).where(eq(auditLog.siteId, site.id));
    expect(audit).toMatchObject([
      { action: "csv.import", actorId: owner.id, detail: { sensorId: sensor.id, rows: 5, stored: 4, outsideSpots: 1 } },
    ]);
  });

  it("a second file with other values for the same times counts them as conflicts, not as already stored", async () => {
    const { site, sensor, token } = await setup();
    const form = { intent: "import", sensorId: String(sensor.id), dateFormat: "iso", timeZone: "Europe/Madrid" };
    answer(await post(site.id, token, CSV, form));
    const again = answer(await post(site.id, token, CSV, form)).body.imported;
    expect(again).toMatchObject({ stored: 0, duplicates: 4, conflicts: 0 });
    const other = CSV.replace(",15\n", ",17\n").replace("02:30,13\n", "02:30,12\n");
    expect(answer(await post(site.id, token, other, form)).body.imported).toMatchObject({
      stored: 0,
      duplicates: 2,
      conflicts: 2,
    });
  });

  it("answers 429 while the same grower's other preview or import runs", async () => {
    const { owner, site, sensor, token } = await setup();
    const release = csvSlot(String(owner.id))!;
    try {
      const { status, body } = answer(
        await post(site.id, token, CSV, { intent: "preview", sensorId: String(sensor.id) }),
      );
      expect(status).toBe(429);
      expect(body.error).toMatch(/Another preview or import is running/);
    } finally {
      release();
    }
  });

  it(
    "answers a bad time zone, date format and column with errors on " +
      "those fields, keeping what was chosen; 'none' leaves a column " +
      "out (issue 18)",
    async () => {
      const { site, sensor, token } = await setup();
      const fields = {
        intent: "preview",
        sensorId: String(sensor.id),
        dateFormat: "yyyy",
        timeZone: "Mars/Olympus_Mons",
        humidity: "second",
      };
      const { status, body } = answer(await post(site.id, token, CSV, fields));
      expect(status).toBe(400);
      const reply = body.result as { error: Record<string, string[]>; initialValue: Record<string, unknown> };
      expect(reply.error).toMatchObject({
        dateFormat: ["Choose how the dates are written"],
        timeZone: ["Choose a time zone from the list."],
        humidity: ["Choose a column of the file"],
      });
      expect(reply.initialValue).toMatchObject({
        sensorId: String(sensor.id),
        dateFormat: "yyyy",
        timeZone: "Mars/Olympus_Mons",
        humidity: "second",
      });
      expect(reply.initialValue).not.toHaveProperty("file"); // a File cannot go back to the page
      const noSensor = answer(await post(site.id, token, CSV, { intent: "preview", sensorId: "" }));
      expect((noSensor.body.result as { error: Record<string, string[]> }).error.sensorId).toEqual([
        "Choose the sensor the readings came from.",
      ]);

      const good = answer(
        await post(site.id, token, CSV, {
          intent: "preview",
          sensorId: String(sensor.id),
          temperature: "none",
          timestamp: "0",
        }),
      );
      expect(good.status).toBe(200);
      expect(
        (good.body.preview as { mapping: { temperature: number | null; timestamp: number } }).mapping,
      ).toMatchObject({ temperature: null, timestamp: 0 });
    },
  );
});
