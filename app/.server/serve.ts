// The process entry: `node build/nichewise-server.mjs` (npm start, Playwright, the benchmark's phone
// figures) or `tsx app/.server/serve.ts --dev` (npm run dev). It only loads the server, so that the
// server and the routes are one module graph: in production from the SSR build
// (build/server/index.js, built from app/.server/server.ts: main() and the routes in one bundle), in
// development through Vite, which loads main.ts and the routes alike.
import { existsSync } from "node:fs";
import http from "node:http";
import path from "node:path";
import { pathToFileURL } from "node:url";
import type { Running } from "./main";

const log = (s: string) => console.log(`[nichewise] ${s}`);

/**
 * Vite's dev server, and main() loaded through it (the routes' graph). `load` reads a module of that
 * graph, the one the running server uses (tests).
 */
export async function startDev(): Promise<Running & { load: (id: string) => Promise<Record<string, unknown>> }> {
  const { createServer } = await import("vite");
  const server = http.createServer();
  // Vite's HMR socket shares our server rather than opening a port of its own.
  const vite = await createServer({ server: { middlewareMode: true, ws: { server } } });
  try {
    const { main } = (await vite.ssrLoadModule("/app/.server/main.ts")) as typeof import("./main");
    const running = await main({ dev: { vite, server } });
    return { ...running, stop: () => running.stop().finally(() => vite.close()), load: (id) => vite.ssrLoadModule(id) };
  } catch (err) {
    await vite.close();
    throw err;
  }
}

/** The production build: the SSR bundle starts the server with the routes it holds. */
export async function startProduction(): Promise<Running> {
  const entry = path.resolve("build/server/index.js");
  if (!existsSync(entry)) throw new Error("No build found: run `npm run build` first");
  const { start } = (await import(pathToFileURL(entry).href)) as typeof import("./server");
  return start();
}

const isEntry =
  process.argv[1] &&
  /(serve\.ts|nichewise-server\.mjs)$/.test(import.meta.filename) &&
  path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isEntry) {
  const dev = process.argv.includes("--dev");
  // React, React Router and Express pick their production code at import, from NODE_ENV: too early
  // to set it here, so the start scripts and the supervisor set it.
  if (!dev && process.env.NODE_ENV !== "production")
    log(
      `NODE_ENV is ${process.env.NODE_ENV ?? "unset"}: running React's development code (slower, more memory); npm start sets NODE_ENV=production`,
    );
  (dev ? startDev() : startProduction()).then(
    (running) => {
      let stopping = false;
      const shutdown = (signal: string) => {
        // A second signal, or a stop still waiting after 20 s (PostgreSQL already gone, say), ends
        // the process: anything unacknowledged is resent by the sensors.
        if (stopping) {
          log(`${signal} again: exiting now`);
          process.exit(1);
        }
        stopping = true;
        log(`${signal}: shutting down…`);
        setTimeout(() => {
          log("shutdown still waiting after 20 s: exiting");
          process.exit(1);
        }, 20_000).unref();
        running.stop().then(() => process.exit(0));
      };
      // In development a Vite server that React Router's plugin starts registers a SIGTERM handler
      // that exits at once, skipping this shutdown (PostgreSQL was left running): ours only.
      process.removeAllListeners("SIGTERM");
      process.on("SIGINT", () => shutdown("SIGINT"));
      process.on("SIGTERM", () => shutdown("SIGTERM"));
    },
    (err) => {
      console.error(`[nichewise] could not start: ${err instanceof Error ? err.message : err}`);
      process.exit(1);
    },
  );
}
