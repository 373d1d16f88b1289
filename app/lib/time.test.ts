// Daylight-saving changes in both hemispheres and with 30-minute offsets. Expected instants are from
// the zones' published rules (IANA tz database): EU clocks change at 01:00 UTC on the last Sundays of
// March and October (Directive 2000/84/EC); the US at 02:00 local on the second Sunday of March and
// the first Sunday of November (Energy Policy Act of 2005); New South Wales and South Australia at
// 02:00 standard / 03:00 daylight time on the first Sundays of October and April; New Zealand at
// 02:00 NZST on the last Sunday of September and 03:00 NZDT on the first Sunday of April.
// India keeps UTC+05:30 all year.
import { describe, expect, it } from "vitest";
import { parseCsvTime } from "~/domain/ingest/csv";
import { zoneClock } from "~/domain/season/local-time";
import {
  describeDstChange,
  parseLocalDateTime,
  resolveWall,
  toLocalInputValue,
  WallClockReader,
  zonedToUtc,
  zoneOffsetMinutes,
} from "~/lib/time";

const utc = (d: Date | number) => new Date(d).toISOString().slice(0, 16) + "Z";
const wall = (s: string) => {
  const [d, t] = s.split(" ");
  const [year, month, day] = d.split("-").map(Number);
  const [hour, minute] = t.split(":").map(Number);
  return { year, month, day, hour, minute };
};
const at = (s: string, zone: string) => utc(zonedToUtc(wall(s), zone));

describe("local wall-clock times to UTC across daylight saving", () => {
  it("Europe/Madrid: 01:30 before the spring change is 00:30Z, and 02:00 on the autumn change is first 00:00Z", () => {
    expect(at("2025-03-30 01:30", "Europe/Madrid")).toBe("2025-03-30T00:30Z");
    expect(at("2025-03-30 01:59", "Europe/Madrid")).toBe("2025-03-30T00:59Z");
    // 02:00–02:59 never happens: moved forward by the gap (Temporal "compatible").
    expect(at("2025-03-30 02:30", "Europe/Madrid")).toBe("2025-03-30T01:30Z");
    expect(at("2025-03-30 03:00", "Europe/Madrid")).toBe("2025-03-30T01:00Z");
    expect(at("2025-10-26 01:59", "Europe/Madrid")).toBe("2025-10-25T23:59Z");
    expect(at("2025-10-26 02:00", "Europe/Madrid")).toBe("2025-10-26T00:00Z");
    expect(at("2025-10-26 02:59", "Europe/Madrid")).toBe("2025-10-26T00:59Z");
    expect(at("2025-10-26 03:00", "Europe/Madrid")).toBe("2025-10-26T02:00Z");
    expect(utc(resolveWall(Date.UTC(2025, 9, 26, 2, 30), "Europe/Madrid", "later").ms)).toBe("2025-10-26T01:30Z");
  });

  it("America/New_York: 2025-03-09 gap at 02:00 and 2025-11-02 repeat of 01:00", () => {
    expect(at("2025-03-09 01:59", "America/New_York")).toBe("2025-03-09T06:59Z");
    expect(at("2025-03-09 02:30", "America/New_York")).toBe("2025-03-09T07:30Z");
    expect(resolveWall(Date.UTC(2025, 2, 9, 2, 30), "America/New_York").kind).toBe("skipped");
    expect(at("2025-03-09 03:00", "America/New_York")).toBe("2025-03-09T07:00Z");
    expect(at("2025-11-02 01:30", "America/New_York")).toBe("2025-11-02T05:30Z");
    expect(utc(resolveWall(Date.UTC(2025, 10, 2, 1, 30), "America/New_York", "later").ms)).toBe("2025-11-02T06:30Z");
    expect(at("2025-11-02 02:00", "America/New_York")).toBe("2025-11-02T07:00Z");
  });

  it("Australia/Sydney (southern hemisphere): gap on 2025-10-05, repeat on 2025-04-06", () => {
    expect(at("2025-10-05 01:59", "Australia/Sydney")).toBe("2025-10-04T15:59Z");
    expect(at("2025-10-05 02:30", "Australia/Sydney")).toBe("2025-10-04T16:30Z");
    expect(at("2025-10-05 03:00", "Australia/Sydney")).toBe("2025-10-04T16:00Z");
    expect(at("2025-04-06 02:30", "Australia/Sydney")).toBe("2025-04-05T15:30Z");
    expect(utc(resolveWall(Date.UTC(2025, 3, 6, 2, 30), "Australia/Sydney", "later").ms)).toBe("2025-04-05T16:30Z");
    expect(at("2025-07-01 12:00", "Australia/Sydney")).toBe("2025-07-01T02:00Z");
  });

  it("Australia/Adelaide (UTC+09:30/+10:30) and Asia/Kolkata (UTC+05:30, no change)", () => {
    expect(at("2025-10-05 01:59", "Australia/Adelaide")).toBe("2025-10-04T16:29Z");
    expect(at("2025-10-05 02:15", "Australia/Adelaide")).toBe("2025-10-04T16:45Z");
    expect(at("2025-10-05 03:00", "Australia/Adelaide")).toBe("2025-10-04T16:30Z");
    expect(at("2025-04-06 02:45", "Australia/Adelaide")).toBe("2025-04-05T16:15Z");
    expect(utc(resolveWall(Date.UTC(2025, 3, 6, 2, 45), "Australia/Adelaide", "later").ms)).toBe("2025-04-05T17:15Z");
    expect(at("2025-03-30 02:30", "Asia/Kolkata")).toBe("2025-03-29T21:00Z");
    expect(zoneOffsetMinutes(new Date("2025-10-26T01:00Z"), "Asia/Kolkata")).toBe(330);
  });

  it("Pacific/Auckland: gap on 2025-09-28 at 02:00, repeat on 2025-04-06 at 02:00", () => {
    expect(at("2025-09-28 01:30", "Pacific/Auckland")).toBe("2025-09-27T13:30Z");
    expect(at("2025-09-28 02:30", "Pacific/Auckland")).toBe("2025-09-27T14:30Z");
    expect(at("2025-09-28 03:00", "Pacific/Auckland")).toBe("2025-09-27T14:00Z");
    expect(at("2025-04-06 02:30", "Pacific/Auckland")).toBe("2025-04-05T13:30Z");
    expect(utc(resolveWall(Date.UTC(2025, 3, 6, 2, 30), "Pacific/Auckland", "later").ms)).toBe("2025-04-05T14:30Z");
  });

  it("every local minute of a year round-trips through the offset of its instant (Madrid, Sydney, Adelaide)", () => {
    for (const zone of ["Europe/Madrid", "Australia/Sydney", "Australia/Adelaide"]) {
      const clock = zoneClock(zone);
      for (let naive = Date.UTC(2025, 0, 1); naive < Date.UTC(2026, 0, 1); naive += 15 * 60_000) {
        const r = resolveWall(naive, zone);
        if (r.kind === "skipped") continue;
        expect(r.ms + clock.offsetAt(r.ms)).toBe(naive);
        if (r.kind === "repeated") expect(r.later + clock.offsetAt(r.later)).toBe(naive);
      }
    }
  });

  it("parseLocalDateTime and toLocalInputValue agree across the autumn change", () => {
    expect(utc(parseLocalDateTime("2025-10-26T02:30", "Europe/Madrid")!)).toBe("2025-10-26T00:30Z");
    expect(toLocalInputValue(new Date("2025-10-26T01:30Z"), "Europe/Madrid")).toBe("2025-10-26T02:30");
    expect(toLocalInputValue(new Date("2025-10-26T00:30Z"), "Europe/Madrid")).toBe("2025-10-26T02:30");
    expect(parseLocalDateTime("2025-02-30T10:00", "Europe/Madrid")).toBeNull();
  });
});

describe("a logger's file of naive local times, read in file order", () => {
  /** Every `step` minutes of local wall time from `from` for `n` rows, as a logger that follows the clock writes them. */
  function loggerTimes(zone: string, fromUtc: number, n: number, stepMin: number): string[] {
    const clock = zoneClock(zone);
    return Array.from({ length: n }, (_, k) => {
      const ms = fromUtc + k * stepMin * 60_000;
      return new Date(ms + clock.offsetAt(ms)).toISOString().slice(0, 16).replace("T", " ");
    });
  }

  for (const [zone, spring, autumn] of [
    ["Europe/Madrid", Date.UTC(2025, 2, 29, 22), Date.UTC(2025, 9, 25, 22)],
    ["America/New_York", Date.UTC(2025, 2, 9, 4), Date.UTC(2025, 10, 2, 3)],
    ["Australia/Sydney", Date.UTC(2025, 9, 4, 13), Date.UTC(2025, 3, 5, 13)],
    ["Australia/Adelaide", Date.UTC(2025, 9, 4, 13), Date.UTC(2025, 3, 5, 13)],
    ["Pacific/Auckland", Date.UTC(2025, 8, 27, 11), Date.UTC(2025, 3, 5, 11)],
  ] as const) {
    it(`${zone}: six hours of 10-minute rows over each change come back as the instants they were written at`, () => {
      for (const from of [spring, autumn]) {
        const times = loggerTimes(zone, from, 36, 10);
        const reader = new WallClockReader(zone);
        const read = times.map((t) => parseCsvTime(t, "iso", reader)!.getTime());
        expect(read).toEqual(times.map((_t, k) => from + k * 600_000));
        expect(new Set(read).size).toBe(times.length);
      }
    });
  }

  it("says how the repeated and skipped rows were read", () => {
    const zone = "Europe/Madrid";
    const reader = new WallClockReader(zone);
    for (const t of [
      "2025-10-26 01:50",
      "2025-10-26 02:00",
      "2025-10-26 02:30",
      "2025-10-26 02:00",
      "2025-10-26 02:30",
      "2025-10-26 03:00",
    ])
      parseCsvTime(t, "iso", reader);
    for (const t of [
      "2025-03-30 01:30",
      "2025-03-30 02:00",
      "2025-03-30 02:20",
      "2025-03-30 02:40",
      "2025-03-30 03:00",
    ])
      parseCsvTime(t, "iso", reader);
    const [repeat, gap] = [...reader.changes.values()];
    expect(repeat).toMatchObject({
      kind: "repeated",
      rows: 4,
      first: 2,
      second: 2,
      offsetBeforeMin: 120,
      offsetAfterMin: 60,
    });
    expect(gap).toMatchObject({ kind: "skipped", rows: 3 });
    expect(describeDstChange(repeat)).toBe(
      "4 rows in the repeated hour of 26 October 2025 were read in " +
        "file order: 2 rows as the first occurrence, UTC+02:00, then 2 " +
        "rows after the clock went back as the second, UTC+01:00.",
    );
    expect(describeDstChange(gap)).toBe(
      "3 rows in the skipped hour of 30 March 2025 (clocks went forward, so those times never happened) were read as 1 h later, UTC+02:00 (02:00 as 03:00).",
    );
  });
});
