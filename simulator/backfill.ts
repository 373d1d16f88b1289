// Backfill: a stretch of simulated history written through the product's bulk path (the same
// writer as live ingest: deduplicated raw rows plus rollups), in large batches, with progress.
import type { Reading } from "~/domain/ingest/payload";
import { generate, type Scenario, type SimSite, type SimSpot } from "./model";

export type BackfillTarget = { sensorId: number; spot: SimSpot; seed: number };

export async function backfill(opts: {
  site: SimSite;
  scenario: Scenario;
  targets: BackfillTarget[];
  from: Date;
  to: Date;
  intervalMs: number;
  write: (rows: Reading[]) => Promise<unknown>;
  batchSize?: number;
  progress?: (done: number, total: number) => void;
}) {
  const batchSize = opts.batchSize ?? 10_000;
  const perSensor = Math.ceil((opts.to.getTime() - opts.from.getTime()) / opts.intervalMs);
  const total = perSensor * opts.targets.length;
  let written = 0;
  let lastReport = 0;
  // Two batches in flight keep PostgreSQL busy while the next batch is generated.
  const inflight: Promise<unknown>[] = [];
  for (const target of opts.targets) {
    let batch: Reading[] = [];
    const flush = async () => {
      const rows = batch;
      batch = [];
      inflight.push(opts.write(rows));
      written += rows.length;
      if (inflight.length >= 2) await inflight.shift();
    };
    for (const r of generate(opts.site, target.spot, opts.scenario, {
      from: opts.from,
      to: opts.to,
      intervalMs: opts.intervalMs,
      sensorSeed: target.seed,
      installedAt: opts.from,
    })) {
      batch.push({
        sensorId: target.sensorId,
        measuredAt: r.measuredAt,
        temperature: r.temperature,
        humidity: r.humidity,
        lux: r.lux ?? null,
        battery: r.battery,
      });
      if (batch.length >= batchSize) {
        await flush();
        if (opts.progress && written - lastReport >= total / 20) {
          lastReport = written;
          opts.progress(written, total);
        }
      }
    }
    if (batch.length > 0) await flush();
  }
  await Promise.all(inflight);
  opts.progress?.(written, total);
  return { written };
}
