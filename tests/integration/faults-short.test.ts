// The short form of `npm run test:faults` (tests/faults/soak.ts): 20,000 simulated readings from
// live MQTT.js clients with one fault of each kind, against the test run's PostgreSQL. Checked
// after each fault and at the end: nothing acknowledged is lost, nothing is counted twice, and
// rollups equal a fresh aggregation of the raw readings. MQTT 3.1.1 §4.3.2: QoS 1 is at least once.
// The second run kills the server process itself (SIGKILL) mid-stream and starts it again.
import { expect, inject, it } from "vitest";
import { alertProblems, formatReport, runSoak, type SoakReport } from "../faults/soak-core";

it(
  "20,000 readings through a PostgreSQL kill, a broker restart, cut connections and a held lock: 0 lost, 0 double-counted",
  { timeout: 150_000 },
  async () => {
    const report = await runSoak({
      databaseUrl: inject("databaseUrl"),
      pgDataDir: inject("pgDataDir"),
      pgPort: inject("pgPort"),
      pgDatabase: "nichewise_test",
      readings: 20_000,
      clients: 10,
      ratePerSecond: 1000,
      faults: [
        { at: 0.15, kind: "kill-postgres" },
        { at: 0.35, kind: "restart-broker" },
        { at: 0.55, kind: "cut-connections" },
        { at: 0.75, kind: "lock-rollups" },
      ],
    });
    console.log(formatReport(report));
    expect(report.faults.map((f) => f.kind)).toEqual([
      "kill-postgres",
      "restart-broker",
      "cut-connections",
      "lock-rollups",
    ]);
    expectNothingLostOrDoubled(report);
    // The kill really hit the ingest path.
    expect(report.writeFailures).toBeGreaterThan(0);
    if (report.alerts) {
      expect(report.alerts.repeated, "an alert open twice for one rule").toBe(0);
      expect(report.alerts.lostOpen, "an open alert event gone after a fault").toBe(0);
      expect(report.alerts.overlapping, "events of one rule overlapping in time").toBe(0);
      expect(alertProblems(report.alerts)).toEqual([]);
    }
  },
);

it(
  "6,000 readings through two SIGKILLs of the server process, each started again on its port: 0 lost, 0 double-counted",
  { timeout: 150_000 },
  async () => {
    const report = await runSoak({
      databaseUrl: inject("databaseUrl"),
      pgDataDir: inject("pgDataDir"),
      pgPort: inject("pgPort"),
      pgDatabase: "nichewise_test",
      readings: 6_000,
      clients: 6,
      ratePerSecond: 1000,
      serverProcess: true,
      faults: [
        { at: 0.3, kind: "kill-server" },
        { at: 0.7, kind: "kill-server" },
      ],
    });
    console.log(formatReport(report));
    expect(report.faults.map((f) => f.kind)).toEqual(["kill-server", "kill-server"]);
    expectNothingLostOrDoubled(report);
    // The kills really hit the stream: readings were in flight, and the sensors had to reconnect.
    for (const f of report.faults) expect(f.inFlight, f.check.after).toBeGreaterThan(0);
    expect(report.reconnects).toBeGreaterThan(0);
  },
);

/** After each fault and at the end: every reading acknowledged, stored once, in the right rollups. */
function expectNothingLostOrDoubled(report: SoakReport) {
  for (const f of report.faults) {
    expect(f.check.lost, f.check.after).toBe(0);
    expect(f.check.doubleCounted, f.check.after).toBe(0);
    expect(f.check.unexpected, f.check.after).toBe(0);
    expect(f.check.rollupHoursDiffering, f.check.after).toBe(0);
  }
  expect(report.acked).toBe(report.distinct);
  expect(report.stored).toBe(report.distinct);
  expect(report).toMatchObject({
    lost: 0,
    doubleCounted: 0,
    unexpected: 0,
    valueMismatches: 0,
    rollupHoursDiffering: 0,
    rejectedByBroker: 0,
  });
}
