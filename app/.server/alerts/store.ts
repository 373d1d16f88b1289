// The alerts' one store: every read and write of the evaluator, the notifier, the silence watcher
// and the forecast warnings, on the schema's own tables and inferred types (who gets the e-mails:
// recipients.ts). Its queries sit by concern in store-watches.ts (watches and their state),
// store-events.ts (events and deliveries), store-readings.ts (a spot's readings) and
// store-forecast.ts (forecast warnings); this module is the surface they are used through, with the
// transaction they share. Drizzle's query builder throughout; raw `sql` only for what it cannot say
// (calibrated values, greatest(), epoch arithmetic). Times come from the caller's clock: nothing
// here reads the database's now().
import { db, type Tx } from "~/.server/db";

export * from "~/.server/alerts/store-watches";
export * from "~/.server/alerts/store-events";
export * from "~/.server/alerts/store-readings";
export * from "~/.server/alerts/store-forecast";

/** Runs `work` in one transaction: its row locks hold until it commits. */
export function inTransaction(work: (tx: Tx) => Promise<void>): Promise<void> {
  return db().transaction(work);
}

/** What went wrong, for the log: the driver's own message (Drizzle wraps it with the whole statement). */
export function failure(err: unknown): unknown {
  if (!(err instanceof Error)) return err;
  return err.cause instanceof Error ? err.cause.message : err.message;
}
