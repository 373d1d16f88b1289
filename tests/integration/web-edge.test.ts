// The web edge, through the real server: startDev() starts it as `npm run dev` does (Vite's development build of the routes,
// since the production build comes later in `npm test`) on a free port, with its broker and mail
// sink, against the test database. Requests go over real sockets; every one is bounded by a timeout
// so that a hang fails rather than stalls the run.
import http from "node:http";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import {
  createSession,
  generateSessionToken,
  MAX_FAILURES_PER_ADDRESS,
  readSessionToken,
  sessionIdFromToken,
  SESSION_DAYS,
  verifyPassword,
} from "~/.server/auth";
import { db } from "~/.server/db";
import { sunkMail } from "~/.server/mail";
import { sessions, users } from "~/db/schema.server";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

Object.assign(process.env, {
  HOST: "127.0.0.1",
  PORT: "0",
  MQTT_PORT: "0",
  MQTT_WS_PORT: "0",
  NW_SINK_PORT: "0",
  NW_DEMO: "0",
  NW_SIMULATOR: "0",
  TRUST_PROXY: "0",
});

let running: Awaited<ReturnType<typeof import("~/.server/serve").startDev>>;
let port = 0;

beforeAll(async () => {
  const { startDev } = await import("~/.server/serve");
  running = await startDev();
  port = running.port;
  // The first request builds the routes in Vite.
  expect((await send({ path: "/sign-in" })).status).toBe(200);
}, 180_000);
afterAll(async () => {
  await running?.stop();
});

type Answer = { status: number; headers: http.IncomingHttpHeaders; body: string };

/**
 * One request. `stream` bytes are sent in 64 KB chunks (chunked unless Content-Length is given),
 * stopping as soon as an answer arrives, as a client that reads its answer would, or, with
 * `deaf`, sending all of them whatever the answer, as curl does.
 */
function send(opts: {
  path: string;
  method?: string;
  headers?: Record<string, string>;
  body?: string;
  stream?: number;
  deaf?: boolean;
  from?: string;
}): Promise<Answer> {
  return new Promise((resolve, reject) => {
    let answered = false;
    const timer = setTimeout(() => {
      req.destroy();
      reject(new Error(`no answer to ${opts.method ?? "GET"} ${opts.path} within 30 s`));
    }, 30_000);
    const req = http.request(
      {
        host: "127.0.0.1",
        port,
        path: opts.path,
        method: opts.method ?? "GET",
        headers: opts.headers,
        localAddress: opts.from,
      },
      (res) => {
        answered = true;
        let body = "";
        res.setEncoding("utf8");
        res.on("data", (d) => (body += d));
        res.on("end", () => {
          clearTimeout(timer);
          resolve({ status: res.statusCode!, headers: res.headers, body });
          if (!opts.deaf) req.destroy();
        });
        res.on("error", () => {});
      },
    );
    req.on("error", (err) => {
      if (!answered) {
        clearTimeout(timer);
        reject(err);
      }
    });
    if (opts.stream) {
      const chunk = Buffer.alloc(64 * 1024, "a");
      let sent = 0;
      const pump = () => {
        while ((opts.deaf || !answered) && sent < opts.stream! && !req.destroyed) {
          sent += chunk.byteLength;
          if (!req.write(chunk)) return void req.once("drain", pump);
        }
        if (!answered && !req.destroyed) req.end();
      };
      pump();
    } else {
      req.end(opts.body);
    }
  });
}

const origin = () => `http://127.0.0.1:${port}`;
const form = (fields: Record<string, string>) => new URLSearchParams(fields).toString();
const FORM = "application/x-www-form-urlencoded";

async function signedIn() {
  const user = await makeUser();
  const token = generateSessionToken();
  await createSession(token, user.id);
  return { user, token, cookie: `nw_session=${token}` };
}

describe("request bodies are bounded before any route reads them (issue 14 §1)", () => {
  it("a chunked ingest body over 4 MB gets 413, and the server keeps answering", async () => {
    const { user } = await signedIn();
    const site = await makeSite(user);
    const sensor = await makeSensor(site, await makeSpot(site));
    // As the curl did (and a sensor flushing its backlog would): all 5 MB sent whatever the answer.
    const over = await send({
      path: "/api/ingest",
      method: "POST",
      headers: {
        Authorization: `Bearer ${sensor.id}.${sensor.secret}`,
        "Content-Type": "application/json",
        "Transfer-Encoding": "chunked",
      },
      stream: 5 * 1024 * 1024,
      deaf: true,
    });
    expect(over.status).toBe(413);
    await new Promise((r) => setTimeout(r, 500)); // what was sent after the answer reaches the server
    expect((await send({ path: "/sign-in" })).status).toBe(200);
    // A batch within the limit is still taken.
    const ok = await send({
      path: "/api/ingest",
      method: "POST",
      headers: { Authorization: `Bearer ${sensor.id}.${sensor.secret}`, "Content-Type": "application/json" },
      body: JSON.stringify({ t: new Date().toISOString(), temperature: 21.5 }),
    });
    expect(ok.status, ok.body).toBeLessThan(300);
  });

  it("a chunked CSV import over its limit gets 413 at once rather than hanging", async () => {
    const { user, cookie } = await signedIn();
    const site = await makeSite(user);
    const over = await send({
      path: `/sites/${site.id}/import`,
      method: "POST",
      headers: {
        Cookie: cookie,
        Origin: origin(),
        "Content-Type": "multipart/form-data; boundary=nwboundary",
        "Transfer-Encoding": "chunked",
      },
      stream: 22 * 1024 * 1024,
    });
    expect(over.status).toBe(413);
    expect((await send({ path: "/sign-in" })).status).toBe(200);
  });

  it("a form post declaring 200 MB, or chunked past 1 MB, gets 413 (forms: 64 KB)", async () => {
    const declared = await send({
      path: "/sign-in",
      method: "POST",
      headers: { "Content-Type": FORM, "Content-Length": String(200 * 1024 * 1024) },
      stream: 1024 * 1024,
    });
    expect(declared.status).toBe(413);
    const chunked = await send({
      path: "/sign-in",
      method: "POST",
      headers: { "Content-Type": FORM, "Transfer-Encoding": "chunked" },
      stream: 1024 * 1024 + 1,
    });
    expect(chunked.status).toBe(413);
    // A malformed Origin is refused, not a 500.
    const badOrigin = await send({
      path: "/sign-in",
      method: "POST",
      headers: { "Content-Type": FORM, Origin: "http://[bad" },
      body: "email=a",
    });
    expect(badOrigin.status).toBe(403);
    // The ingest and import limits are not for requests without their credentials.
    const anonymousIngest = await send({
      path: "/api/ingest",
      method: "POST",
      headers: { "Transfer-Encoding": "chunked" },
      stream: 1024 * 1024,
    });
    expect(anonymousIngest.status).toBe(413);
    const { user } = await signedIn();
    const site = await makeSite(user);
    const madeUpSession = await send({
      path: `/sites/${site.id}/import`,
      method: "POST",
      headers: {
        Cookie: "nw_session=madeup",
        Origin: origin(),
        "Content-Type": "multipart/form-data; boundary=nwboundary",
        "Transfer-Encoding": "chunked",
      },
      stream: 1024 * 1024,
    });
    expect(madeUpSession.status).toBe(413);
    expect((await send({ path: "/sign-in" })).status).toBe(200);
  });

  it("past the budget of bodies held at once, a post gets 503 with Retry-After, and the budget is given back", async () => {
    // The server's own copy (Vite's module graph, which the routes and the adapter share).
    const { BODY_BUDGETS } = (await running.load(
      "/app/.server/http-adapter.ts",
    )) as typeof import("~/.server/http-adapter");
    const before = BODY_BUDGETS.form.used;
    // As if many other form posts were being read at this moment.
    BODY_BUDGETS.form.used += BODY_BUDGETS.form.max;
    try {
      const r = await send({
        path: "/sign-in",
        method: "POST",
        headers: { "Content-Type": FORM, Origin: origin() },
        body: form({ email: "a@example.test", password: "x" }),
      });
      expect(r.status).toBe(503);
      expect(r.headers["retry-after"]).toBeDefined();
    } finally {
      BODY_BUDGETS.form.used -= BODY_BUDGETS.form.max;
    }
    const ok = await send({
      path: "/sign-in",
      method: "POST",
      headers: { "Content-Type": FORM, Origin: origin() },
      body: form({ email: "a@example.test", password: "x" }),
    });
    expect(ok.status).toBe(200);
    // Given back when the server has closed the exchange, which may follow the answer by a moment.
    for (let i = 0; i < 100 && BODY_BUDGETS.form.used !== before; i++) await new Promise((r) => setTimeout(r, 20));
    expect(BODY_BUDGETS.form.used).toBe(before);
  });

  it("actions check the session before they read the body", async () => {
    const { user } = await signedIn();
    const site = await makeSite(user);
    const spot = await makeSpot(site);
    const sensor = await makeSensor(site, spot);
    // A body that cannot be parsed: read first, it was a 500; checked first, it is the sign-in redirect.
    for (const path of [
      `/sites/${site.id}/alerts`,
      `/sites/${site.id}/members`,
      `/sites/${site.id}/spots/${spot.id}/alerts`,
      `/sites/${site.id}/sensors/${sensor.id}`,
      `/api/sites/${site.id}/notes`,
    ]) {
      const r = await send({
        path,
        method: "POST",
        headers: { Origin: origin(), "Content-Type": "multipart/form-data; boundary=nw" },
        body: "not multipart at all",
      });
      expect(r.status, path).toBe(302);
      expect(r.headers.location, path).toMatch(/^\/sign-in\?next=/);
    }
  });
});

describe("security headers and the production policy (issue 14 §1)", () => {
  it("sends a CSP (in production: scripts by nonce only), frame-ancestors 'none', nosniff and a referrer policy", async () => {
    const r = await send({ path: "/sign-in" });
    const csp = r.headers["content-security-policy"] as string;
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(r.headers["x-content-type-options"]).toBe("nosniff");
    expect(r.headers["referrer-policy"]).toBe("same-origin");
    // This server runs Vite, whose development policy allows inline scripts. The production policy
    // allows only the nonce: checked here, and against the pages in Chromium by
    // tests/e2e/security-headers.spec.ts.
    expect(csp).toContain("script-src 'self' 'unsafe-inline'");
    const { contentSecurityPolicy } = await import("~/.server/http-adapter");
    expect(
      contentSecurityPolicy("abc")
        .split("; ")
        .find((d) => d.startsWith("script-src")),
    ).toBe("script-src 'self' 'nonce-abc'");
  });
});

const signInPost = (fields: Record<string, string>, headers: Record<string, string> = {}, from?: string) =>
  send({
    path: "/sign-in",
    method: "POST",
    headers: { "Content-Type": FORM, Origin: origin(), ...headers },
    body: form(fields),
    from,
  });

const locked = (r: Answer) => r.status === 200 && r.body.includes("Too many failed attempts");

describe("the sign-in rate limit is keyed on the client's socket address (issue 14 §2, OWASP Authentication Cheat Sheet)", () => {
  beforeEach(async () => {
    await db().execute(sql`delete from sign_in_failures`);
  });

  it("a client cannot escape the limit by sending X-Nichewise-Client or X-Forwarded-For itself", async () => {
    for (let i = 0; i < MAX_FAILURES_PER_ADDRESS; i++) {
      const r = await signInPost(
        { email: `nobody${i}@example.test`, password: "wrong password" },
        { "X-Nichewise-Client": `10.9.${i}.1`, "X-Forwarded-For": `10.8.${i}.1` },
        "127.0.0.4",
      );
      expect(locked(r)).toBe(false);
    }
    const next = await signInPost(
      { email: "nobody-else@example.test", password: "wrong password" },
      { "X-Nichewise-Client": "10.7.7.7", "X-Forwarded-For": "10.6.6.6" },
      "127.0.0.4",
    );
    expect(locked(next)).toBe(true);
  });

  it("a flood of failures on made-up accounts, and on a real one, from one address does not lock the real owner out elsewhere", async () => {
    const owner = await makeUser();
    for (let i = 0; i < MAX_FAILURES_PER_ADDRESS; i++)
      await signInPost({ email: `made-up${i}@example.test`, password: "wrong password" }, {}, "127.0.0.5");
    for (let i = 0; i < 6; i++) await signInPost({ email: owner.email, password: "wrong password" }, {}, "127.0.0.6");
    expect(locked(await signInPost({ email: owner.email, password: owner.password }, {}, "127.0.0.5"))).toBe(true);
    const r = await signInPost({ email: owner.email, password: owner.password }, {}, "127.0.0.7");
    expect(r.status, r.body.slice(0, 200)).toBe(302);
    expect(String(r.headers["set-cookie"])).toMatch(/^nw_session=/);
  });
});

describe("`next` after sign-in and sign-up stays on this site (issue 14 §2, OWASP Unvalidated Redirects Cheat Sheet)", () => {
  const payloads = [
    "/\\evil.example/x",
    "/%09/evil.example/x",
    "/\t/evil.example/x",
    "//evil.example/x",
    "https://evil.example/x",
    "/\\/evil.example",
    "/./\\evil.example",
    "\\\\evil.example",
  ];

  it("refuses off-site targets after a sign-in and keeps on-site ones", async () => {
    const u = await makeUser();
    for (const next of payloads) {
      const r = await signInPost({ email: u.email, password: u.password, next: decodeURIComponent(next) });
      expect(r.status, next).toBe(302);
      expect(r.headers.location, next).toBe("/");
    }
    const ok = await signInPost({ email: u.email, password: u.password, next: "/settings?x=1" });
    expect(ok.headers.location).toBe("/settings?x=1");
  });

  it("refuses them for a signed-in visitor of /sign-in and /sign-up", async () => {
    const { cookie } = await signedIn();
    for (const page of ["/sign-in", "/sign-up"]) {
      for (const next of payloads) {
        const r = await send({
          path: `${page}?next=${encodeURIComponent(decodeURIComponent(next))}`,
          headers: { Cookie: cookie },
        });
        expect(r.status, `${page} ${next}`).toBe(302);
        expect(r.headers.location, `${page} ${next}`).toBe("/");
      }
    }
  });
});

describe("sessions (issue 14 §2)", () => {
  it("a session renewed in the database is sent to the browser again with its new expiry", async () => {
    const { user, token, cookie } = await signedIn();
    // Ten days left: past the half-way point, so the next request renews it to thirty.
    await db()
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() + 10 * 86_400_000) })
      .where(eq(sessions.id, sessionIdFromToken(token)));
    const r = await send({ path: "/", headers: { Cookie: cookie } });
    expect(r.status).toBe(200);
    const set = ([] as string[]).concat(r.headers["set-cookie"] ?? []).find((c) => c.startsWith("nw_session="));
    expect(set, "Set-Cookie on renewal").toBeDefined();
    expect(await readSessionToken(set)).toBe(token);
    const expires = new Date(/Expires=([^;]+)/.exec(set!)![1]).getTime();
    expect(expires).toBeGreaterThan(Date.now() + (SESSION_DAYS - 1) * 86_400_000);
    // Not renewed again on the next request: no cookie then.
    const again = await send({ path: "/", headers: { Cookie: cookie } });
    expect(again.headers["set-cookie"]).toBeUndefined();
    expect(user.id).toBeGreaterThan(0);
  });
});

describe("sign-up answers the same whether the address has an account (issue 14 §2, OWASP Authentication Cheat Sheet)", () => {
  const signUp = (fields: Record<string, string>) =>
    send({ path: "/sign-up", method: "POST", headers: { "Content-Type": FORM, Origin: origin() }, body: form(fields) });

  it("redirects both alike, signs in only the new account, and tells the address's owner by e-mail", async () => {
    const existing = await makeUser();
    const taken = await signUp({
      name: "Someone",
      email: existing.email,
      password: "another long password",
      next: "/settings",
    });
    const fresh = await signUp({
      name: "New grower",
      email: `new-${Date.now()}@example.test`,
      password: "another long password",
      next: "/settings",
    });
    expect(taken.status).toBe(302);
    expect(fresh.status).toBe(302);
    expect(taken.headers.location).toBe(fresh.headers.location);
    expect(taken.body).not.toMatch(/exists|already/i);
    expect(taken.headers["set-cookie"]).toBeUndefined();
    expect(String(fresh.headers["set-cookie"])).toMatch(/^nw_session=/);
    // The existing account is untouched.
    const [row] = await db().select().from(users).where(eq(users.email, existing.email));
    expect(await verifyPassword(row.passwordHash, existing.password)).toBe(true);
    let mail: ReturnType<typeof sunkMail>[number] | undefined;
    for (let i = 0; i < 200 && !mail; i++) {
      mail = sunkMail().find((m) => m.to.includes(existing.email));
      if (!mail) await new Promise((r) => setTimeout(r, 50));
    }
    expect(mail, "a notice to the address's owner").toBeDefined();
    expect(mail!.raw).toMatch(/already has one/);
  });

  it("bounds the password before argon2 reads it", async () => {
    const long = "x".repeat(10_000);
    const u = await makeUser();
    const r = await signInPost({ email: u.email, password: long }, {}, "127.0.0.8");
    expect(r.status).toBe(200);
    expect(r.body).toContain("do not match");
    const s = await signUp({ name: "Long", email: `long-${Date.now()}@example.test`, password: long });
    expect(s.status).toBe(200);
    expect(s.body).toContain("longer than we accept");
  });
});
