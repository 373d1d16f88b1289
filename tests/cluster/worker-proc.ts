// An ingest worker alone in a process for the benchmark (the code NW_ROLE=ingest runs, without the
// rest of the server): consumes the engine's queue, writes through its own writer, and reports its
// count and CPU over IPC. Run bundled: node worker-proc.mjs '<JSON list of AMQP URLs>'.
import { closeDb, pool } from "../../app/.server/db";
import { startIngestWorker } from "../../app/.server/cluster/worker";
import { ReadingWriter } from "../../app/.server/ingest/writer";

const writer = new ReadingWriter(pool, 5, 2000);
const worker = await startIngestWorker({
  urls: JSON.parse(process.argv[2]) as string[],
  queue: "nichewise.readings",
  shards: Number(process.env.NW_AMQP_SHARDS ?? 4),
  prefetch: 2000,
  writer,
  log: () => {},
});
process.send!({ ready: true });
process.on("message", async (msg: { cmd: string }) => {
  if (msg.cmd === "stats") {
    const cpu = process.cpuUsage();
    process.send!({
      accepted: worker.stats.accepted,
      active: worker.activeShards(),
      cpuMs: (cpu.user + cpu.system) / 1000,
    });
  } else if (msg.cmd === "stop") {
    await worker.close();
    await closeDb();
    process.exit(0);
  }
});
process.on("disconnect", () => process.exit(0));
