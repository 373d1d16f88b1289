// The ingest process of the benchmark: the real broker and writer, alone in a process so that its
// CPU and memory are its own. Talks to the benchmark over IPC.
import { readFileSync } from "node:fs";
import { monitorEventLoopDelay } from "node:perf_hooks";
import { startBroker } from "../../app/.server/ingest/broker";
import { importCsv, previewCsv } from "../../app/.server/ingest/csv-import";
import type { CsvMapping } from "../../app/domain/ingest/csv";
import { ReadingWriter } from "../../app/.server/ingest/writer";
import { closeDb, pool } from "../../app/.server/db";

const writer = new ReadingWriter(pool, 5, 2000);
let peakRss = 0;
// memoryUsage.rss() reads one number; memoryUsage() walks the heap spaces and cost ~2 % of this process's CPU at 50 Hz.
setInterval(() => (peakRss = Math.max(peakRss, process.memoryUsage.rss())), 20).unref();

const broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer, log: () => {} });
process.send!({ port: broker.port });
/**
 * A CSV file previewed and then imported in this process, beside whatever MQTT load the benchmark
 * sends: the event loop's delay (what every PUBACK and page waits on) and the growth of RSS.
 */
async function csvUnderLoad(msg: { file: string; sensorId: number; mapping: CsvMapping }) {
  (globalThis as { gc?: () => void }).gc?.();
  const rss0 = process.memoryUsage.rss();
  let peak = rss0;
  const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage.rss())), 20);
  const delay = monitorEventLoopDelay({ resolution: 10 });
  delay.enable();
  const t0 = performance.now();
  // The upload's bytes, as the route holds them.
  const file = readFileSync(msg.file);
  const bytes = new Uint8Array(file.buffer, file.byteOffset, file.byteLength);
  const preview = await previewCsv(bytes, msg.mapping, msg.sensorId);
  const t1 = performance.now();
  const result = await importCsv(bytes, msg.mapping, msg.sensorId);
  const t2 = performance.now();
  delay.disable();
  clearInterval(sampler);
  peak = Math.max(peak, process.memoryUsage.rss());
  const heap = process.memoryUsage();
  (globalThis as { gc?: () => void }).gc?.();
  const afterGc = process.memoryUsage.rss();
  process.send!({
    p50Ms: delay.percentile(50) / 1e6,
    p99Ms: delay.percentile(99) / 1e6,
    maxMs: delay.max / 1e6,
    growthMb: (peak - rss0) / 2 ** 20,
    afterGcMb: (afterGc - rss0) / 2 ** 20,
    heapUsedMb: heap.heapUsed / 2 ** 20,
    heapTotalMb: heap.heapTotal / 2 ** 20,
    previewMs: t1 - t0,
    importMs: t2 - t1,
    rows: preview.rows,
    stored: result.stored,
    dst: preview.dstChanges.length,
  });
}

process.on("message", async (msg: { cmd: string }) => {
  if (msg.cmd === "csv") await csvUnderLoad(msg as unknown as Parameters<typeof csvUnderLoad>[0]);
  else if (msg.cmd === "stats") {
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
