// Dates as the pages write them: month names, an instant in a site's zone, "5 min ago". Intl only,
// with no Temporal (lib/time.ts), so a page that only writes dates does not ship the polyfill.

/** The English month names, January first. */
export const MONTH_NAMES = [
  "January",
  "February",
  "March",
  "April",
  "May",
  "June",
  "July",
  "August",
  "September",
  "October",
  "November",
  "December",
] as const;

/** The three-letter English month names, Jan first. */
export const MONTH_SHORT = [
  "Jan",
  "Feb",
  "Mar",
  "Apr",
  "May",
  "Jun",
  "Jul",
  "Aug",
  "Sep",
  "Oct",
  "Nov",
  "Dec",
] as const;

export function formatInZone(instant: Date | string, timeZone: string, opts?: Intl.DateTimeFormatOptions) {
  return new Intl.DateTimeFormat("en-GB", {
    timeZone,
    day: "numeric",
    month: "short",
    year: "numeric",
    hour: "2-digit",
    minute: "2-digit",
    ...opts,
  }).format(new Date(instant));
}

export function timeAgo(instant: Date | string | null | undefined, now = Date.now()): string {
  if (!instant) return "never";
  const s = Math.round((now - new Date(instant).getTime()) / 1000);
  if (s < 0) return "just now";
  if (s < 90) return `${s} s ago`;
  if (s < 5400) return `${Math.round(s / 60)} min ago`;
  if (s < 36 * 3600) return `${Math.round(s / 3600)} h ago`;
  return `${Math.round(s / 86400)} days ago`;
}
