// One MQTT message of a sensor, however it arrived (the embedded broker, or cluster mode's queues):
// decoded for its channel, checked against the sensor (what it can measure, its last temperature),
// written by the one writer, and its temperature remembered for the next reading's jump check.
import { decodeMessage, validateReading, type ChannelTopic } from "~/domain/ingest/payload";
import {
  cachedSensorInfo,
  lastTemperature,
  noteTemperature,
  sensorInfo,
  type SensorInfo,
} from "~/.server/ingest/sensor-cache";
import type { ReadingWriter } from "~/.server/ingest/writer";

/** The reason recorded for a reading whose time already holds a different value. */
export const CONFLICT_REASON =
  "conflicting duplicate: a different value is already stored for this sensor and time (kept the stored one)";

/** What became of a message: exactly one of these is called. */
export type MessageOutcome = {
  /** Stored, after the commit. */
  stored: () => void;
  /** Can't be stored: acknowledge it all the same (the sensor can do nothing about it) and record why. */
  refused: (reason: string) => void;
  /** The database did not take it: it must come again. */
  failed: (err: Error) => void;
};

/**
 * Takes one message of sensor `sensorId` on `channel`. A sensor already in the cache is checked and
 * written without waiting for anything else (the hot path).
 */
export function ingestMessage(
  writer: ReadingWriter,
  sensorId: number,
  channel: ChannelTopic | "reading",
  payload: Buffer,
  on: MessageOutcome,
): void {
  const decoded = decodeMessage(channel, payload);
  if (!decoded.ok) return on.refused(decoded.reason);
  const partial = channel !== "reading";
  const write = (info: SensorInfo | null) => {
    if (!info) return on.refused("unknown sensor (deleted?)");
    const parsed = validateReading(sensorId, decoded.payload as never, {
      now: new Date(),
      kind: info.kind,
      previous: lastTemperature(sensorId),
    });
    if (!parsed.ok) return on.refused(parsed.reason);
    const reading = parsed.reading;
    writer.store([partial ? { ...reading, partial } : reading]).then((r) => {
      // The stored value stays; the new one is recorded as refused.
      if (r.conflicts > 0) return on.refused(CONFLICT_REASON);
      if (reading.temperature !== null) noteTemperature(sensorId, reading.measuredAt.getTime(), reading.temperature);
      on.stored();
    }, on.failed);
  };
  const info = cachedSensorInfo(sensorId);
  if (info !== undefined) return write(info);
  sensorInfo(sensorId)
    .then(write)
    .catch((err: Error) => on.failed(err));
}
