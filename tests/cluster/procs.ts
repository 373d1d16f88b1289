// Nichewise processes of cluster mode for the cluster test and the benchmark: the built server
// (build/nichewise-server.mjs, as `npm start` runs it) with NW_ROLE=web or ingest. Each one's
// output goes to a log file; callers wait for a line and see when others appear.
import { spawn, type ChildProcess } from "node:child_process";
import { createWriteStream, mkdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { createInterface } from "node:readline";

export const SERVER = path.resolve("build/nichewise-server.mjs");

export type Proc = {
  name: string;
  child: ChildProcess;
  /** Resolves with the time the first line matching `re` appeared (from now on, or already). */
  waitFor: (re: RegExp, timeoutMs?: number) => Promise<number>;
  kill: (signal?: NodeJS.Signals) => Promise<void>;
  /** The last line so far matching `re`. */
  lastLine: (re: RegExp) => string | undefined;
  alive: () => boolean;
  rssMb: () => number | null;
};

export function startServerProc(name: string, logDir: string, env: Record<string, string>): Proc {
  mkdirSync(logDir, { recursive: true });
  const out = createWriteStream(path.join(logDir, `${name}.log`));
  // The server's Node flag and NODE_ENV, as in package.json's start (DEVELOPERS.md).
  const child = spawn(process.execPath, ["--max-semi-space-size=32", SERVER], {
    env: { ...process.env, NODE_ENV: "production", NW_DEMO: "0", NW_SIMULATOR: "0", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const lines: { at: number; text: string }[] = [];
  const waiters: { re: RegExp; resolve: (at: number) => void }[] = [];
  const onLine = (text: string) => {
    const at = Date.now();
    out.write(`${new Date(at).toISOString()} ${text}\n`);
    if (lines.length < 10_000 || /active on shards/.test(text)) lines.push({ at, text });
    for (const w of [...waiters]) {
      if (w.re.test(text)) {
        waiters.splice(waiters.indexOf(w), 1);
        w.resolve(at);
      }
    }
  };
  createInterface({ input: child.stdout! }).on("line", onLine);
  createInterface({ input: child.stderr! }).on("line", onLine);
  let exited = false;
  child.once("exit", () => (exited = true));
  return {
    name,
    child,
    waitFor: (re, timeoutMs = 120_000) =>
      new Promise((resolve, reject) => {
        const timer = setTimeout(
          () =>
            reject(new Error(`${name}: no line matching ${re} in ${timeoutMs / 1000} s (see ${logDir}/${name}.log)`)),
          timeoutMs,
        );
        const done = (at: number) => {
          clearTimeout(timer);
          resolve(at);
        };
        waiters.push({ re, resolve: done });
        child.once("exit", (code, signal) => {
          const i = waiters.findIndex((w) => w.resolve === done);
          if (i >= 0) {
            waiters.splice(i, 1);
            clearTimeout(timer);
            reject(
              new Error(`${name} exited (${code ?? signal}) before a line matching ${re} (see ${logDir}/${name}.log)`),
            );
          }
        });
      }),
    kill: (signal = "SIGTERM") =>
      new Promise<void>((resolve) => {
        if (exited) return resolve();
        child.once("exit", () => resolve());
        child.kill(signal);
      }),
    alive: () => !exited,
    lastLine: (re) => lines.findLast((l) => re.test(l.text))?.text,
    rssMb: () => rssMb(child.pid),
  };
}

/** Resident memory of a process in MB (/proc), or null when it is gone. */
export function rssMb(pid: number | undefined): number | null {
  if (!pid) return null;
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Math.round(Number(m[1]) / 1024) : null;
  } catch {
    return null;
  }
}
