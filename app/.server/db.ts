// One pool per process, opened on first use after the process entry has set DATABASE_URL.
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { kept } from "~/.server/kept";
import * as schema from "~/db/schema.server";

export type Db = NodePgDatabase<typeof schema> & { $client: pg.Pool };
/** A transaction of the database, as `db().transaction(work)` hands it to `work`. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
/** What a query runs on: the database itself or one of its transactions. */
export type Queryable = Db | Tx;

type Holder = { pool?: pg.Pool; db?: Db };
const holder = kept<Holder>("db", () => ({}));

export function pool(): pg.Pool {
  if (!holder.pool) {
    const url = process.env.DATABASE_URL;
    if (!url) throw new Error("DATABASE_URL is not set (the process entry sets it after starting PostgreSQL)");
    holder.pool = new pg.Pool({ connectionString: url, max: 10 });
    // A dropped connection must not crash the process; queries on it fail and are retried by callers.
    holder.pool.on("error", (err) => console.error("[db] idle client error:", err.message));
    // A checked-out client whose server dies emits "error" too; without a listener that is a crash.
    holder.pool.on("connect", (client) =>
      client.on("error", (err) => console.error("[db] client error:", err.message)),
    );
  }
  return holder.pool;
}

export function db(): Db {
  holder.db ??= drizzle(pool(), { schema, casing: "snake_case" }) as Db;
  return holder.db;
}

export async function closeDb() {
  const p = holder.pool;
  holder.pool = undefined;
  holder.db = undefined;
  await p?.end();
}

export async function runMigrations(folder = "drizzle") {
  await migrate(db(), { migrationsFolder: folder });
}
