import { describe, expect, it } from "vitest";
import { clockToMinute, inQuietHours, minuteToClock } from "./quiet";

describe("inQuietHours", () => {
  // 1 December: London is on GMT (UTC+0), New York on EST (UTC−5) — IANA tz database.
  it("handles a span that wraps midnight, in the site's zone", () => {
    const q = [22 * 60, 7 * 60] as const;
    expect(inQuietHours(new Date("2026-12-01T23:30:00Z"), "Europe/London", ...q)).toBe(true);
    expect(inQuietHours(new Date("2026-12-01T06:59:00Z"), "Europe/London", ...q)).toBe(true);
    expect(inQuietHours(new Date("2026-12-01T07:00:00Z"), "Europe/London", ...q)).toBe(false);
    expect(inQuietHours(new Date("2026-12-01T23:30:00Z"), "America/New_York", ...q)).toBe(false);
  });
  it("no quiet hours when unset or empty", () => {
    expect(inQuietHours(new Date(), "Europe/London", null, null)).toBe(false);
    expect(inQuietHours(new Date(), "Europe/London", 60, 60)).toBe(false);
  });
  it("reads and writes clock times", () => {
    expect(clockToMinute("22:30")).toBe(1350);
    expect(clockToMinute("24:00")).toBeNull();
    expect(minuteToClock(1350)).toBe("22:30");
  });
});
