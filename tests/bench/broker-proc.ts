// The ingest process of the benchmark: the real broker and writer, alone in a process so that its
// CPU and memory are its own. Talks to the benchmark over IPC.
import { startBroker } from "../../app/.server/ingest/broker";
import { ReadingWriter } from "../../app/.server/ingest/writer";
import { closeDb, pool } from "../../app/.server/db";

const writer = new ReadingWriter(pool, 5, 2000);
let peakRss = 0;
// memoryUsage.rss() reads one number; memoryUsage() walks the heap spaces and cost ~2 % of this process's CPU at 50 Hz.
setInterval(() => (peakRss = Math.max(peakRss, process.memoryUsage.rss())), 20).unref();

const broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer, log: () => {} });
process.send!({ port: broker.port });
process.on("message", async (msg: { cmd: string }) => {
  if (msg.cmd === "stats") {
    await writer.drain();
    const cpu = process.cpuUsage();
    process.send!({ cpuMs: (cpu.user + cpu.system) / 1000, peakRss, inserted: writer.stats.inserted });
  } else if (msg.cmd === "stop") {
    await broker.close();
    await writer.drain();
    await closeDb();
    process.exit(0);
  }
});
