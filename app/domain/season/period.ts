// The twelve months a verdict judges, as the pages name them.

export type PeriodView = { firstMonth: string; lastMonth: string; toToday: boolean };

const monthFormat = new Intl.DateTimeFormat("en-GB", { month: "short", year: "numeric", timeZone: "UTC" });
/** "2025-01" → "Jan 2025". */
export const monthLabel = (key: string) =>
  monthFormat.format(new Date(Date.UTC(Number(key.slice(0, 4)), Number(key.slice(5, 7)) - 1, 15)));

/** "Jan 2025 – Dec 2025", or "Dec 2025 – today" for a period that runs to today. */
export const periodLabel = (p: PeriodView) =>
  `${monthLabel(p.firstMonth)} – ${p.toToday ? "today" : monthLabel(p.lastMonth)}`;
