// The writer's statement text, variant by variant, pinned in files under __snapshots__/write-sql/:
// a change to the SQL shows up in review as a diff of plain SQL. Every variant named here is one
// the writer runs (see ReadingWriter.commit and writeStatement); the text is checked against a real
// PostgreSQL by the ingest integration tests.
import { describe, expect, it } from "vitest";
import { columns, SEEN_SQL, sqlFor, type Variant } from "~/.server/ingest/write-sql";

const base: Variant = {
  merge: false,
  withRows: false,
  withKeys: false,
  withSeen: true,
  optimistic: true,
  withOutside: false,
};

const VARIANTS: [string, Variant][] = [
  ["a broker batch, tried first as a plain INSERT", base],
  ["the same batch again after a duplicate, with ON CONFLICT DO NOTHING", { ...base, optimistic: false }],
  ["single-channel readings merged into their rows", { ...base, merge: true, optimistic: false }],
  ["with the committed rows for the alert engine", { ...base, withRows: true }],
  ["one HTTP or CSV caller, told the readings outside every spot", { ...base, withOutside: true }],
  [
    "several counting callers in one group commit, told their keys",
    { ...base, optimistic: false, withKeys: true, withOutside: true },
  ],
  ["a half of a large one-sensor batch (the sensor row set apart)", { ...base, withSeen: false, withOutside: true }],
];

describe("the writer's SQL variants", () => {
  for (const [what, v] of VARIANTS) {
    it(`${what}: ${sqlFor(v).name}`, async () => {
      const { name, text } = sqlFor(v);
      await expect(text).toMatchFileSnapshot(`./__snapshots__/write-sql/${name}.sql`);
    });
  }

  it("names every variant apart, and a merging variant is never optimistic", () => {
    const names = VARIANTS.map(([, v]) => sqlFor(v).name);
    expect(new Set(names).size).toBe(VARIANTS.length);
    expect(sqlFor({ ...base, merge: true, optimistic: true })).toEqual(
      sqlFor({ ...base, merge: true, optimistic: false }),
    );
  });

  it("the split batch's sensor update", () => {
    expect(SEEN_SQL).toMatchInlineSnapshot(`
      "UPDATE sensors SET last_seen_at = greatest(last_seen_at, to_timestamp($2::float8 / 1000)), battery = coalesce($3::real, battery)
        WHERE id = $1 AND (last_seen_at IS NULL OR to_timestamp($2::float8 / 1000) >= last_seen_at)"
    `);
  });
});

describe("the statement's parameters", () => {
  it("are PostgreSQL array literals, NULL for a missing channel, times as epoch milliseconds", () => {
    const at = new Date("2026-01-17T03:00:00Z");
    const cols = columns([
      { sensorId: 7, measuredAt: at, temperature: 9.5, humidity: null, lux: null, battery: 88 },
      {
        sensorId: 7,
        measuredAt: new Date(at.getTime() + 60_000),
        temperature: null,
        humidity: 91,
        lux: 0,
        battery: null,
        partial: true,
      },
    ]);
    expect(cols).toEqual([
      "{7,7}",
      `{${at.getTime()},${at.getTime() + 60_000}}`,
      "{9.5,NULL}",
      "{NULL,91}",
      "{NULL,0}",
      "{88,NULL}",
    ]);
  });
});
