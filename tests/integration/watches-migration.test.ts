// The alert_rules → watches migration renames in place: a database migrated up to the one before it
// keeps its watches, their ids, state and events, and new watches continue the same id sequence.
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { afterAll, describe, expect, inject, it } from "vitest";

const TAG = "0010_alerts_watches";
const DB = "nw_watches_migration";
const url = (name: string) => {
  const u = new URL(inject("databaseUrl"));
  u.pathname = `/${name}`;
  return u.toString();
};

/** A copy of drizzle/ whose journal stops before (or at) the rename. */
function migrationsUpTo(includeRename: boolean) {
  const dir = mkdtempSync(path.join(tmpdir(), "nw-mig-"));
  cpSync(path.resolve("drizzle"), dir, { recursive: true });
  const journalPath = path.join(dir, "meta/_journal.json");
  const journal = JSON.parse(readFileSync(journalPath, "utf8")) as { entries: { idx: number; tag: string }[] };
  const at = journal.entries.findIndex((e) => e.tag === TAG);
  if (at < 0) throw new Error(`${TAG} not in the journal`);
  journal.entries = journal.entries.slice(0, includeRename ? at + 1 : at);
  writeFileSync(journalPath, JSON.stringify(journal));
  return dir;
}

const admin = new pg.Client({ connectionString: inject("databaseUrl") });
let client: pg.Pool | null = null;
const folders: string[] = [];

afterAll(async () => {
  await client?.end();
  await admin.query(`DROP DATABASE IF EXISTS ${DB}`);
  await admin.end();
  for (const f of folders) rmSync(f, { recursive: true, force: true });
});

describe("watches migration", () => {
  it("renames alert_rules to watches keeping every row, its id, its state and its events", async () => {
    await admin.connect();
    await admin.query(`DROP DATABASE IF EXISTS ${DB}`);
    await admin.query(`CREATE DATABASE ${DB}`);
    client = new pg.Pool({ connectionString: url(DB), max: 2 });
    const db = drizzle(client);
    const before = migrationsUpTo(false);
    const after = migrationsUpTo(true);
    folders.push(before, after);

    await migrate(db, { migrationsFolder: before });
    const q = async <T extends pg.QueryResultRow>(text: string, values: unknown[] = []) =>
      (await client!.query<T>(text, values)).rows;
    const [site] = await q<{ id: number }>(
      `INSERT INTO sites (name, latitude, longitude, time_zone) VALUES ('Home', 52, 5, 'Europe/Amsterdam') RETURNING id`,
    );
    const [spot] = await q<{ id: number }>(
      `INSERT INTO spots (site_id, name, indoor) VALUES ($1, 'Balcony', false) RETURNING id`,
      [site.id],
    );
    const warnedAt = new Date("2026-11-30T21:00:00Z");
    const [rule] = await q<{ id: number }>(
      `INSERT INTO alert_rules (spot_id, kind, threshold, reason, warned_at, early_warning) VALUES ($1, 'cold', 8, 'Masdevallia', $2, true) RETURNING id`,
      [spot.id, warnedAt],
    );
    await q(`INSERT INTO alert_events (rule_id, spot_id, kind, started_at, peak) VALUES ($1, $2, 'cold', $3, 6.5)`, [
      rule.id,
      spot.id,
      warnedAt,
    ]);

    await migrate(db, { migrationsFolder: after });

    expect(await q(`SELECT to_regclass('alert_rules') AS old`)).toEqual([{ old: null }]);
    const [kept] = await q<{ id: number; threshold: number; reason: string; warned_at: Date; early_warning: boolean }>(
      `SELECT id, threshold, reason, warned_at, early_warning FROM watches WHERE spot_id = $1`,
      [spot.id],
    );
    expect(kept).toEqual({
      id: rule.id,
      threshold: 8,
      reason: "Masdevallia",
      warned_at: warnedAt,
      early_warning: true,
    });
    expect(await q(`SELECT rule_id, peak FROM alert_events`)).toEqual([{ rule_id: rule.id, peak: 6.5 }]);
    // The id sequence and the constraints came along under the names drizzle now expects.
    const [next] = await q<{ id: number }>(
      `INSERT INTO watches (spot_id, kind, threshold) VALUES ($1, 'silent', 60) RETURNING id`,
      [spot.id],
    );
    expect(next.id).toBe(rule.id + 1);
    const names = (
      await q<{ name: string }>(
        `SELECT conname AS name FROM pg_constraint WHERE conrelid IN ('watches'::regclass, 'alert_events'::regclass)
       UNION SELECT indexname FROM pg_indexes WHERE tablename = 'watches' ORDER BY 1`,
      )
    ).map((r) => r.name);
    const expected = [
      "watches_pkey",
      "watches_spot_id_spots_id_fk",
      "alert_events_rule_id_watches_id_fk",
      "watches_spot_id_index",
    ];
    expect(names).toEqual(expect.arrayContaining(expected));
    expect(names.filter((n) => n.includes("alert_rules"))).toEqual([]);
    // Deleting a watch still removes its events (the foreign key kept its cascade).
    await q(`DELETE FROM watches WHERE id = $1`, [rule.id]);
    expect(await q(`SELECT id FROM alert_events`)).toEqual([]);
  });
});
