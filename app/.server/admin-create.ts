// `npm run admin:create -- --email you@example.org [--name "Your name"]`: makes the first admin of
// an install that runs without the demo household (or another admin later). The password is read
// from standard input when it is piped (`… < password.txt`), otherwise one is generated and printed
// once. An existing account with that e-mail is made admin and keeps its password. Uses DATABASE_URL,
// or the embedded PostgreSQL in NW_PG_DATA (started for the command if the server is not running).
import { randomBytes } from "node:crypto";
import path from "node:path";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { hashPassword } from "~/.server/auth";
import { db } from "~/.server/db";
import { users } from "~/db/schema.server";
import { MAX_PASSWORD_LENGTH } from "~/forms/auth";

export type AdminCreated = { email: string; created: boolean; generatedPassword: string | null };

const input = z.object({
  email: z.string().trim().toLowerCase().pipe(z.email("not an e-mail address")),
  name: z.string().trim().min(1).max(80).default("Admin"),
  password: z.string().min(10, "use at least 10 characters").max(MAX_PASSWORD_LENGTH).optional(),
});

export async function createAdmin(opts: { email: string; name?: string; password?: string }): Promise<AdminCreated> {
  const parsed = input.safeParse(opts);
  if (!parsed.success) throw new Error(parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; "));
  const { email, name } = parsed.data;
  const [existing] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  if (existing) {
    await db().update(users).set({ isAdmin: true }).where(eq(users.id, existing.id));
    return { email, created: false, generatedPassword: null };
  }
  const generatedPassword = parsed.data.password ? null : randomBytes(15).toString("base64url");
  const password = parsed.data.password ?? generatedPassword!;
  await db()
    .insert(users)
    .values({ email, name, isAdmin: true, passwordHash: await hashPassword(password) });
  return { email, created: true, generatedPassword };
}

async function readStdin(): Promise<string | undefined> {
  if (process.stdin.isTTY) return undefined;
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of process.stdin) {
    size += (chunk as Buffer).byteLength;
    if (size > 4096) throw new Error("standard input is longer than a password");
    chunks.push(chunk as Buffer);
  }
  const text = Buffer.concat(chunks)
    .toString("utf8")
    .replace(/\r?\n$/, "");
  return text === "" ? undefined : text;
}

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  if (i >= 0) return process.argv[i + 1];
  const eq = process.argv.find((a) => a.startsWith(`--${name}=`));
  return eq?.slice(name.length + 3);
}

async function cli() {
  const email = arg("email");
  if (!email) {
    console.error(
      'usage: npm run admin:create -- --email you@example.org [--name "Your name"]   (password on standard input, or one is generated)',
    );
    return 2;
  }
  const password = await readStdin();
  const { env } = await import("~/.server/env");
  const { embeddedPid, startEmbeddedPostgres } = await import("~/.server/postgres");
  let stopPg: (() => Promise<void>) | undefined;
  if (!process.env.DATABASE_URL) {
    const e = env();
    const running = embeddedPid(e.NW_PG_DATA) !== undefined;
    const pg = await startEmbeddedPostgres({
      dataDir: e.NW_PG_DATA,
      port: e.NW_PG_PORT,
      database: "nichewise",
      log: () => {},
    });
    process.env.DATABASE_URL = pg.url;
    if (!running) stopPg = pg.stop;
  }
  const { closeDb, runMigrations } = await import("~/.server/db");
  try {
    await runMigrations(path.resolve("drizzle"));
    const r = await createAdmin({ email, name: arg("name"), password });
    if (!r.created) console.log(`${r.email} has an account already: it is an admin now (password unchanged).`);
    else if (r.generatedPassword)
      console.log(`Admin ${r.email} created. Password (shown once, change it in Settings): ${r.generatedPassword}`);
    else console.log(`Admin ${r.email} created with the password from standard input.`);
    return 0;
  } finally {
    await closeDb();
    await stopPg?.();
  }
}

const isEntry =
  process.argv[1] &&
  /admin-create\.ts$/.test(process.argv[1]) &&
  path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isEntry) {
  cli().then(
    (code) => process.exit(code),
    (err) => {
      console.error(`[nichewise] could not create the admin: ${err instanceof Error ? err.message : err}`);
      process.exit(1);
    },
  );
}
