// The SQL pieces that file readings into hourly rollups, shared by the writer's statement
// (ingest/write-sql.ts) and the rebuild (rollups/rebuild.ts), so both put a reading in the same hour.
import { CONDENSATION_MARGIN_C } from "~/domain/season/thresholds";

/**
 * SQL for the instant the local hour containing `at` began: `at` minus the minutes and seconds past
 * the local hour. Rounding the local wall time and converting it back would be ambiguous in the hour
 * clocks go back (PostgreSQL reads the repeated wall time as the later instant, filing a reading
 * under an hour that starts after it).
 */
export const LOCAL_HOUR_START = (at: string, timeZone: string) =>
  `(${at} - ((${at} AT TIME ZONE ${timeZone}) - date_trunc('hour', ${at} AT TIME ZONE ${timeZone})))`;

/** An hour's readings with a dew-point margin and those under the condensation margin (a channel added to a stored row counts once). */
export const DP_COUNTS = (margin: string) =>
  `count(${margin})::int AS dp_n, (count(*) FILTER (WHERE ${margin} < ${CONDENSATION_MARGIN_C}))::int AS dp_under_n`;
