// Our HTTP edge between Express and React Router: every request body is bounded and read here,
// before any route sees it, and the Fetch Request that React Router gets carries the bytes already
// read. React Router's own listener streams the socket into the Request; a route that refused an
// over-limit body part-way then crashed the process (the stream kept pushing after its cancel) or
// left the request hanging. Here a body over its limit is answered 413 and its connection closed.
import { randomBytes } from "node:crypto";
import type { IncomingMessage } from "node:http";
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from "express";
import { writeReadableStreamToWritable } from "@react-router/node";
import { createRequestHandler, type AppLoadContext, type ServerBuild } from "react-router";
import { readSessionToken, SESSION_COOKIE, sessionCookie, sessionIsLive } from "~/.server/auth";
import type { RunningBroker } from "~/.server/ingest/broker";
import { MAX_HTTP_BYTES } from "~/.server/ingest/http";
import type { ReadingWriter } from "~/.server/ingest/writer";
import { requestScope, type RequestScope } from "~/.server/request-scope";
import { CSV_MAX_BYTES } from "~/domain/ingest/csv";

/** The long-lived services main() starts, for loaders and actions. */
export type Services = {
  /** The process's one reading writer (HTTP ingest, CSV import, the broker). */
  writer: ReadingWriter;
  /** The embedded MQTT broker, for its ports; none in a cluster web instance (sensors talk to the engine). */
  broker: RunningBroker | null;
};

declare module "react-router" {
  interface AppLoadContext {
    services: Services;
    /** The client's address: the socket's, or the one a trusted proxy forwarded (TRUST_PROXY). */
    clientAddress: string;
    /** This response's Content-Security-Policy nonce, for the inline scripts React Router writes. */
    nonce: string;
  }
}

/** Forms and everything else. */
export const FORM_MAX_BYTES = 64 * 1024;
/** The CSV import: its documented file limit plus the multipart form around it. */
export const IMPORT_MAX_BYTES = CSV_MAX_BYTES + 64 * 1024;

/**
 * How many bytes of each kind of body may be held at once, all requests together: past it the
 * server answers 503 (with Retry-After) rather than grow. Separate, so that a flood of one kind
 * (forms from anyone, batches with made-up sensor tokens) does not refuse the others.
 */
type Budget = { readonly name: string; readonly max: number; used: number };
export const BODY_BUDGETS = {
  form: { name: "form", max: 32 * 1024 * 1024, used: 0 } as Budget,
  ingest: { name: "ingest", max: 8 * MAX_HTTP_BYTES, used: 0 } as Budget,
  import: { name: "import", max: 3 * IMPORT_MAX_BYTES, used: 0 } as Budget,
};

const IMPORT_PATH = /^\/sites\/\d+\/import(?:\.data)?$/;

/**
 * The most bytes a request may send, and the budget it counts against. The large limits are only
 * for the two routes that need them and only with their credential: a bearer token for the ingest
 * API (verified by the route before it reads anything), a live session for the CSV import. Anyone
 * else is held to a form's size.
 */
export async function bodyLimit(
  pathname: string,
  headers: IncomingMessage["headers"],
): Promise<{ limit: number; budget: Budget }> {
  pathname = pathname.replace(/(.)\/+$/, "$1");
  if (pathname === "/api/ingest" && /^Bearer \S/.test(headers.authorization ?? ""))
    return { limit: MAX_HTTP_BYTES, budget: BODY_BUDGETS.ingest };
  if (IMPORT_PATH.test(pathname)) {
    const token = await readSessionToken(headers.cookie);
    if (token && (await sessionIsLive(token).catch(() => false)))
      return { limit: IMPORT_MAX_BYTES, budget: BODY_BUDGETS.import };
  }
  return { limit: FORM_MAX_BYTES, budget: BODY_BUDGETS.form };
}

type BodyRead =
  { ok: true; bytes: Buffer; release: () => void } | { ok: false; status: 400 | 413 | 503; message: string };

function readBody(req: IncomingMessage, limit: number, budget: Budget): Promise<BodyRead> {
  const tooLarge = {
    ok: false,
    status: 413,
    message:
      budget === BODY_BUDGETS.import
        ? `The file is over ${CSV_MAX_BYTES / 1024 / 1024} MB; split it and import the parts.`
        : `Request body over ${limit >= 1024 * 1024 ? `${Math.round(limit / 1024 / 1024)} MB` : `${limit / 1024} KB`}.`,
  } as const;
  const busy = { ok: false, status: 503, message: "Too many uploads at once: try again in a minute." } as const;
  const declared = req.headers["content-length"];
  if (declared !== undefined && !/^\d+$/.test(declared))
    return Promise.resolve({ ok: false, status: 400, message: "Bad Content-Length." });
  if (declared !== undefined && Number(declared) > limit) return Promise.resolve(tooLarge);
  return new Promise((resolve) => {
    const chunks: Buffer[] = [];
    let size = 0;
    let settled = false;
    const release = () => {
      budget.used -= size;
      size = 0;
    };
    const finish = (result: BodyRead) => {
      if (settled) return;
      settled = true;
      req.off("data", onData);
      req.off("end", onEnd);
      req.off("error", onAbort);
      req.off("close", onClose);
      if (!result.ok) release();
      resolve(result);
    };
    const onData = (chunk: Buffer) => {
      size += chunk.byteLength;
      budget.used += chunk.byteLength;
      if (size > limit) return finish(tooLarge);
      if (budget.used > budget.max) return finish(busy);
      chunks.push(chunk);
    };
    const onEnd = () => finish({ ok: true, bytes: Buffer.concat(chunks), release });
    const onAbort = () => finish({ ok: false, status: 400, message: "The request was cut off." });
    const onClose = () => {
      if (!req.complete) onAbort();
    };
    req.on("data", onData);
    req.on("end", onEnd);
    req.on("error", onAbort);
    req.on("close", onClose);
  });
}

/**
 * Answers without reading the rest of the body, and closes the connection: the client is told at
 * once, and what it keeps sending is discarded for a moment (so that it reads the answer rather
 * than a reset) and then cut.
 */
function refuse(req: IncomingMessage, res: ExpressResponse, status: number, message: string) {
  res.status(status).set({ Connection: "close", "Cache-Control": "no-store" });
  if (status === 503) res.set("Retry-After", "60");
  res.type("text/plain").send(message);
  res.once("finish", () => {
    let discarded = 0;
    req.on("data", (chunk: Buffer) => {
      discarded += chunk.byteLength;
      if (discarded > FORM_MAX_BYTES * 16) req.socket.destroy();
    });
    req.resume();
    setTimeout(() => req.socket.destroy(), 2000).unref();
  });
}

function fetchHeaders(req: IncomingMessage, bodyLength: number | null): Headers {
  const headers = new Headers();
  const raw = req.rawHeaders;
  for (let i = 0; i < raw.length; i += 2) {
    const name = raw[i].toLowerCase();
    if (name.startsWith(":") || name === "transfer-encoding" || name === "content-length") continue;
    headers.append(raw[i], raw[i + 1]);
  }
  if (bodyLength !== null) headers.set("Content-Length", String(bodyLength));
  return headers;
}

const handlers = new WeakMap<ServerBuild, ReturnType<typeof createRequestHandler>>();

/**
 * The Express handler that serves the app. `getBuild` is the production build, or in development
 * Vite's current one (loaded again per request so that edits show).
 */
export function reactRouterAdapter(
  getBuild: () => ServerBuild | Promise<ServerBuild>,
  mode: "development" | "production",
  services: Services,
) {
  return async (req: ExpressRequest, res: ExpressResponse, next: NextFunction) => {
    let release = () => {};
    try {
      let body: Buffer | null = null;
      if (req.method !== "GET" && req.method !== "HEAD") {
        const { limit, budget } = await bodyLimit(req.path, req.headers);
        const read = await readBody(req, limit, budget);
        if (!read.ok) return refuse(req, res, read.status, read.message);
        body = read.bytes;
        release = read.release;
        // The body's share of the budget is given back when the exchange ends, however it ends.
        res.once("close", release);
      }
      let url: URL;
      let headers: Headers;
      try {
        url = new URL(req.originalUrl, `${req.protocol}://${req.get("host") || "localhost"}`);
        headers = fetchHeaders(req, body && body.byteLength);
      } catch {
        return refuse(req, res, 400, "Bad request.");
      }
      const controller = new AbortController();
      res.once("close", () => {
        if (!res.writableFinished) controller.abort();
      });
      const request = new Request(url, {
        method: req.method,
        headers,
        body: body as Uint8Array<ArrayBuffer> | null,
        signal: controller.signal,
      });
      const build = await getBuild();
      let handle = handlers.get(build);
      if (!handle) handlers.set(build, (handle = createRequestHandler(build, mode)));
      const scope: RequestScope = {};
      const context = getLoadContext(req, res, services);
      const response = await requestScope.run(scope, () => handle(request, context));
      const cookies = response.headers.getSetCookie();
      // A session renewed while serving this request is sent again with its new expiry, unless the
      // response sets the session cookie itself (sign-in, sign-out).
      if (scope.renewedSession && !cookies.some((c) => c.startsWith(`${SESSION_COOKIE}=`))) {
        cookies.push(await sessionCookie(scope.renewedSession.token, scope.renewedSession.expiresAt));
      }
      await sendResponse(req, res, response, cookies);
    } catch (err) {
      release();
      if (res.headersSent) res.destroy();
      else next(err);
    }
  };
}

/** What every loader and action gets besides the request (React Router's load context). */
function getLoadContext(req: ExpressRequest, res: ExpressResponse, services: Services): AppLoadContext {
  return {
    clientAddress: req.ip ?? req.socket.remoteAddress ?? "unknown",
    nonce: String(res.locals.nonce ?? ""),
    services,
  };
}

async function sendResponse(req: IncomingMessage, res: ExpressResponse, response: Response, cookies: string[]) {
  res.statusCode = response.status;
  if (response.statusText) res.statusMessage = response.statusText;
  for (const [name, value] of response.headers) {
    if (name !== "set-cookie") res.setHeader(name, value);
  }
  if (cookies.length) res.setHeader("Set-Cookie", cookies);
  if (!response.body || req.method === "HEAD") {
    res.end();
    return;
  }
  await writeReadableStreamToWritable(response.body, res);
}

/**
 * Headers for every response, and the nonce that lets the app's own inline scripts run (React
 * Router writes its hydration data and module loader inline). In development Vite injects scripts
 * of its own, so the policy there allows inline scripts and its WebSocket.
 */
export function securityHeaders(opts: { dev: boolean; https: boolean }) {
  return (_req: ExpressRequest, res: ExpressResponse, next: NextFunction) => {
    const nonce = randomBytes(16).toString("base64");
    // No nonce on the page in development: the policy there allows inline scripts anyway, and
    // React reports the dev-only critical-CSS link's nonce (hidden by the browser) as a mismatch.
    res.locals.nonce = opts.dev ? "" : nonce;
    res.setHeader("Content-Security-Policy", contentSecurityPolicy(nonce, opts.dev));
    res.setHeader("X-Content-Type-Options", "nosniff");
    res.setHeader("Referrer-Policy", "same-origin");
    res.setHeader("X-Frame-Options", "DENY");
    res.setHeader("Cross-Origin-Opener-Policy", "same-origin");
    if (opts.https) res.setHeader("Strict-Transport-Security", "max-age=15552000");
    next();
  };
}

export function contentSecurityPolicy(nonce: string, dev = false): string {
  return [
    "default-src 'self'",
    dev ? "script-src 'self' 'unsafe-inline' 'unsafe-eval'" : `script-src 'self' 'nonce-${nonce}'`,
    // Inline style attributes (chart sizes, colour swatches) are allowed; scripts are what matters.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    dev ? "connect-src 'self' ws: wss:" : "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}
