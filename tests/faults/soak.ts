// `npm run test:faults`: the long soak (≥ 100,000 readings) on a PostgreSQL of its own in
// .data/faults, with three PostgreSQL kills, a broker restart, two connection cuts and two held
// locks; then a second run with the broker and writer in a server process of their own, killed
// with SIGKILL mid-stream three times (and PostgreSQL once) and started again each time. Prints the
// figures; exits non-zero on any loss or double count, on overlapping alert events of one rule, or
// on alert events differing from a fresh evaluation beyond ALERT_TOLERANCE.
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

// The server process killed (no shutdown path runs); the sensors resend what was not acknowledged.
const KILLS: { at: number; kind: FaultKind }[] = [
  { at: 0.2, kind: "kill-server" },
  { at: 0.4, kind: "kill-postgres" },
  { at: 0.6, kind: "kill-server" },
  { at: 0.8, kind: "kill-server" },
];

// NW_SOAK_FAULTS=none (or a comma-separated list of kinds) replaces both schedules with one run,
// e.g. for a control run; a list with kill-server runs with the server process.
const chosen = process.env.NW_SOAK_FAULTS;
const runs: { label: string; faults: { at: number; kind: FaultKind }[]; serverProcess: boolean; readings: number }[] =
  chosen === undefined
    ? [
        { label: "in-process broker", faults: FAULTS, serverProcess: false, readings },
        {
          label: "server process killed with SIGKILL",
          faults: KILLS,
          serverProcess: true,
          readings: Math.max(20_000, Math.round(readings / 2)),
        },
      ]
    : [
        {
          label: "chosen faults",
          faults:
            chosen === "none"
              ? []
              : chosen.split(",").map((kind, i, all) => ({ at: (i + 1) / (all.length + 1), kind: kind as FaultKind })),
          serverProcess: chosen.includes("kill-server"),
          readings,
        },
      ];

async function main() {
  stopEmbeddedPostgres(dataDir); // a leftover of an interrupted run
  rmSync(dataDir, { recursive: true, force: true });
  const pg = await startEmbeddedPostgres({ dataDir, port, database, log: () => {} });
  process.env.DATABASE_URL = pg.url;
  const { runMigrations, closeDb } = await import("~/.server/db");
  try {
    await runMigrations(path.resolve("drizzle"));
    log(`PostgreSQL on 127.0.0.1:${port} (data in ${path.relative(process.cwd(), dataDir)})`);
    let failed = false;
    for (const run of runs) {
      log(`${run.label}: ${run.readings} readings, faults ${run.faults.map((f) => f.kind).join(", ") || "none"}`);
      const report = await runSoak({
        databaseUrl: pg.url,
        pgDataDir: dataDir,
        pgPort: port,
        pgDatabase: database,
        readings: run.readings,
        clients,
        ratePerSecond: Number(process.env.NW_SOAK_RATE ?? 2500),
        faults: run.faults,
        serverProcess: run.serverProcess,
        log,
      });
      console.log(`\n${run.label}\n${formatReport(report)}\n`);
      const bad = soakFailed(report);
      console.log(
        bad
          ? "FAILED: readings lost, counted twice, rollups differing or alert events wrong"
          : "OK: 0 lost, 0 double-counted, alert events consistent",
      );
      failed ||= bad;
    }
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
