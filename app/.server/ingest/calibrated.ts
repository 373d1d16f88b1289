// The calibrated value of a reading's channel, as SQL: raw values stay as received, and every query
// that shows or computes (rollups, charts, exports, alerts) applies the sensor's offsets the same way.
// A missing channel stays NULL (least/greatest would turn it into a clamp bound).
export type CalibratedChannel = "temperature" | "humidity" | "lux";

export function calibratedSql(channel: CalibratedChannel, value: string, sensor = "s"): string {
  const offset = `coalesce((${sensor}.calibration->>'${channel}')::real, 0)`;
  if (channel === "temperature") return `(${value} + ${offset})`;
  if (channel === "humidity")
    return `(CASE WHEN ${value} IS NOT NULL THEN least(100, greatest(0, ${value} + ${offset})) END)`;
  return `(CASE WHEN ${value} IS NOT NULL THEN greatest(0, ${value} + ${offset}) END)`;
}
