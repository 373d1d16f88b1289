// A fresh PostgreSQL for each test run, on its own port and data folder, migrated; removed afterwards.
import { rmSync } from "node:fs";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { startEmbeddedPostgres } from "../../app/.server/postgres";

export default async function setup(project: TestProject) {
  const dataDir = path.resolve(`.data/test-pg-${process.pid}`);
  rmSync(dataDir, { recursive: true, force: true });
  const port = Number(process.env.NW_TEST_PG_PORT ?? 55432);
  const pg = await startEmbeddedPostgres({ dataDir, port, database: "nichewise_test", log: () => {} });
  process.env.DATABASE_URL = pg.url;
  const { runMigrations, closeDb } = await import("../../app/.server/db");
  await runMigrations(path.resolve("drizzle"));
  await closeDb();
  project.provide("databaseUrl", pg.url);
  project.provide("pgDataDir", dataDir);
  project.provide("pgPort", port);
  return async () => {
    await pg.stop();
    rmSync(dataDir, { recursive: true, force: true });
  };
}

declare module "vitest" {
  export interface ProvidedContext {
    databaseUrl: string;
    pgDataDir: string;
    pgPort: number;
  }
}
