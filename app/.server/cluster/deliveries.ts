// What the ingest worker (worker.ts) does with one delivery of a shard it holds the lock of: the
// one path of a sensor's message (app/.server/ingest/message.ts, as the embedded broker takes it), and
// the acknowledgement only after the commit. A bad payload, an unknown sensor or a conflicting value is
// acknowledged and recorded with its reason; a failed write is handed back to the queue after a
// pause, so a PostgreSQL outage delays readings and loses none.
import type { Channel, ConsumeMessage } from "amqplib";
import { parseTopic } from "~/domain/ingest/payload";
import { ingestMessage } from "~/.server/ingest/message";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import type { ReadingWriter } from "~/.server/ingest/writer";
import { routingKeyToTopic } from "~/.server/cluster/config";

export type DeliveryStats = { accepted: number; rejected: number; writeFailures: number };

/** A shard as its deliveries see it: their channel, and what was taken from it and not yet settled. */
export type TakenFrom = {
  ch: Channel;
  /** Deliveries taken and not yet acknowledged or handed back. */
  outstanding: number;
  drained: (() => void)[];
};

/** How long a failed write waits before its delivery goes back to the queue (the database may be restarting). */
const RETRY_MS = 1000;

const topicOf = (msg: ConsumeMessage) => routingKeyToTopic(msg.fields.routingKey);

/** Hands the delivery back to the queue. */
export function handBack(ch: Channel, msg: ConsumeMessage) {
  try {
    ch.nack(msg, false, true);
  } catch {
    // closed: the engine has it back
  }
}

/** The handler of a delivery: checks it, writes its reading and settles it (ack, or back to the queue). */
export function deliveryHandler(writer: ReadingWriter, stats: DeliveryStats) {
  function settled(s: TakenFrom) {
    s.outstanding--;
    if (s.outstanding === 0) for (const f of s.drained.splice(0)) f();
  }

  function reject(s: TakenFrom, msg: ConsumeMessage, sensorId: number | null, reason: string) {
    stats.rejected++;
    recordRejectionsSoon([
      { sensorId, source: "mqtt", topic: topicOf(msg), reason, payload: msg.content.subarray(0, 500).toString("utf8") },
    ]);
    ack(s, msg);
  }

  // A channel closed meanwhile (its node died) has handed the delivery back already.
  const ack = (s: TakenFrom, msg: ConsumeMessage) => {
    try {
      s.ch.ack(msg);
    } catch {
      // closed: the engine has it back
    }
    settled(s);
  };

  function failed(s: TakenFrom, msg: ConsumeMessage) {
    stats.writeFailures++;
    setTimeout(() => {
      handBack(s.ch, msg);
      settled(s);
    }, RETRY_MS).unref();
  }

  function handle(s: TakenFrom, msg: ConsumeMessage) {
    try {
      const match = parseTopic(topicOf(msg));
      // The engine let only the sensor itself publish here (see auth.ts); anything else is not a reading.
      if (!match) return reject(s, msg, null, "topic not allowed for this sensor");
      const id = match.sensorId;
      ingestMessage(writer, id, match.channel, msg.content, {
        stored: () => {
          stats.accepted++;
          ack(s, msg); // after COMMIT
        },
        refused: (reason) => reject(s, msg, id, reason),
        failed: () => failed(s, msg),
      });
    } catch (err) {
      console.error("[ingest-worker]", err);
      failed(s, msg);
    }
  }

  return handle;
}
