import { stopEmbeddedPostgres } from "../../app/.server/postgres";

// The app stops its PostgreSQL on SIGTERM; this catches the case where it was killed harder.
export default async function teardown() {
  await new Promise((r) => setTimeout(r, 1000));
  stopEmbeddedPostgres(`.data/e2e-${Number(process.env.NW_E2E_SLOT ?? 0)}/postgres`);
}
