// Running the writer's statement on a connection: first as a plain INSERT, and on a duplicate again
// with ON CONFLICT. The text comes from write-sql.ts.
import type pg from "pg";
import { sqlFor, type Variant } from "~/.server/ingest/write-sql";

export type StatementRow = {
  inserted: number;
  conflicts: [number, number][] | null;
  outside: number;
  placed: [number, number, string, number | null, number | null, number | null][];
  keys?: [number, number][];
  outside_keys?: [number, number][];
};

export const asError = (err: unknown) => (err instanceof Error ? err : new Error(String(err)));

const UNIQUE_VIOLATION = "23505";
const isDuplicate = (err: unknown) => (err as { code?: string }).code === UNIQUE_VIOLATION;

/**
 * The write statement: first as a plain INSERT, and on a duplicate again with ON CONFLICT (inside
 * a transaction, after rolling back to a savepoint). Live batches (a few hundred readings, many a
 * second) run prepared: parsing and planning this statement costs about a millisecond, a tenth of
 * a small batch's commit; bulk batches keep a plan made for their size.
 */
export async function writeStatement(
  client: pg.PoolClient,
  v: Omit<Variant, "optimistic">,
  cols: string[],
  opts: { prepared: boolean; inTransaction?: boolean },
): Promise<StatementRow> {
  const run = (optimistic: boolean) => {
    const { text, name } = sqlFor({ ...v, optimistic });
    return client.query(opts.prepared ? { name, text, values: cols } : { text, values: cols });
  };
  if (v.merge) return (await run(false)).rows[0] as StatementRow;
  if (opts.inTransaction) await client.query("SAVEPOINT optimistic");
  try {
    return (await run(true)).rows[0] as StatementRow;
  } catch (err) {
    if (!isDuplicate(err)) throw err;
    if (opts.inTransaction) await client.query("ROLLBACK TO SAVEPOINT optimistic");
    return (await run(false)).rows[0] as StatementRow;
  }
}
