// `npm run test:faults`: the long soak (≥ 100,000 readings) on a PostgreSQL of its own in
// .data/faults, with three PostgreSQL kills, a broker restart, two connection cuts and two held
// locks. Prints the figures; exits non-zero on any loss or double count, on overlapping alert events
// of one rule, or on alert events differing from a fresh evaluation beyond ALERT_TOLERANCE.
// NW_SOAK_READINGS, NW_SOAK_CLIENTS, NW_SOAK_RATE (publishes/s) and NW_FAULTS_PG_PORT change size, pace and port.
import { rmSync } from "node:fs";
import path from "node:path";
import { startEmbeddedPostgres, stopEmbeddedPostgres } from "~/.server/postgres";
import { formatReport, runSoak, soakFailed, type FaultKind } from "./soak-core";

const dataDir = path.resolve(".data/faults");
const port = Number(process.env.NW_FAULTS_PG_PORT ?? 55479);
const readings = Number(process.env.NW_SOAK_READINGS ?? 100_000);
const clients = Number(process.env.NW_SOAK_CLIENTS ?? 20);
const database = "nichewise_faults";
const log = (s: string) => console.log(`[faults] ${s}`);

const FAULTS: { at: number; kind: FaultKind }[] = [
  { at: 0.1, kind: "kill-postgres" },
  { at: 0.2, kind: "cut-connections" },
  { at: 0.3, kind: "lock-rollups" },
  { at: 0.4, kind: "kill-postgres" },
  { at: 0.5, kind: "restart-broker" },
  { at: 0.6, kind: "lock-readings" },
  { at: 0.7, kind: "kill-postgres" },
  { at: 0.8, kind: "cut-connections" },
];

// NW_SOAK_FAULTS=none (or a comma-separated list of kinds) replaces the schedule, e.g. for a control run.
const chosen = process.env.NW_SOAK_FAULTS;
const schedule = chosen === undefined ? FAULTS : chosen === "none" ? [] : chosen.split(",").map((kind, i, all) => ({ at: (i + 1) / (all.length + 1), kind: kind as FaultKind }));

async function main() {
  stopEmbeddedPostgres(dataDir); // a leftover of an interrupted run
  rmSync(dataDir, { recursive: true, force: true });
  const pg = await startEmbeddedPostgres({ dataDir, port, database, log: () => {} });
  process.env.DATABASE_URL = pg.url;
  const { runMigrations, closeDb } = await import("~/.server/db");
  try {
    await runMigrations(path.resolve("drizzle"));
    log(`PostgreSQL on 127.0.0.1:${port} (data in ${path.relative(process.cwd(), dataDir)})`);
    const report = await runSoak({ databaseUrl: pg.url, pgDataDir: dataDir, pgPort: port, pgDatabase: database, readings, clients, ratePerSecond: Number(process.env.NW_SOAK_RATE ?? 2500), faults: schedule, log });
    console.log(`\n${formatReport(report)}\n`);
    const failed = soakFailed(report);
    console.log(failed ? "FAILED: readings lost, counted twice, rollups differing or alert events wrong" : "OK: 0 lost, 0 double-counted, alert events consistent");
    process.exitCode = failed ? 1 : 0;
  } finally {
    await closeDb().catch(() => {});
    stopEmbeddedPostgres(dataDir);
    rmSync(dataDir, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  stopEmbeddedPostgres(dataDir);
  process.exit(1);
});
