// `node build/nichewise-supervise.mjs node [flags…] build/nichewise-server.mjs`: runs the server as
// a child process and starts it again when it dies, after a back-off that doubles while it keeps
// dying (1 s … 60 s) and resets once it has run for a minute. The web app, the broker and the cold
// alerts live in that one process; without this, a crash stops every household's alerts until
// someone notices. SIGINT and SIGTERM are passed on to the server, and a clean exit (code 0, as after
// such a signal) is not restarted. Under systemd (deploy/nichewise.service) systemd restarts too.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

export type SuperviseOptions = {
  command: string;
  args: string[];
  env?: NodeJS.ProcessEnv;
  minDelayMs?: number;
  maxDelayMs?: number;
  /** A run at least this long counts as healthy: the next restart waits the shortest delay again. */
  stableMs?: number;
  log?: (s: string) => void;
};

export type Supervisor = {
  /** Resolves with the exit code to leave with, once the server has stopped for good. */
  done: Promise<number>;
  /** Passes a signal on to the server and stops restarting it. */
  stop: (signal: NodeJS.Signals) => void;
};

const describeExit = (code: number | null, signal: NodeJS.Signals | null) =>
  signal ? `was killed (${signal})` : `exited with code ${code}`;

export function supervise(opts: SuperviseOptions): Supervisor {
  const log = opts.log ?? ((s: string) => console.log(`[nichewise supervisor] ${s}`));
  const minDelay = opts.minDelayMs ?? 1000;
  const maxDelay = opts.maxDelayMs ?? 60_000;
  const stableMs = opts.stableMs ?? 60_000;
  const command = opts.command === "node" ? process.execPath : opts.command;
  let child: ChildProcess | null = null;
  let timer: NodeJS.Timeout | null = null;
  let stopping = false;
  let delay = minDelay;
  let restarts = 0;
  let resolveDone: (code: number) => void;
  const done = new Promise<number>((resolve) => (resolveDone = resolve));

  const start = () => {
    timer = null;
    const startedAt = Date.now();
    // In its own process group, so that a terminal's Ctrl-C reaches the server once, through us (a
    // second SIGINT makes the server quit at once rather than shut down cleanly).
    const c = spawn(command, opts.args, { stdio: "inherit", env: opts.env ?? process.env, detached: true });
    child = c;
    c.once("error", (err) => log(`could not start the server: ${err.message}`));
    c.once("exit", (code, signal) => {
      child = null;
      if (stopping) return resolveDone(code ?? 0);
      if (code === 0 && !signal) {
        log("the server stopped cleanly: not restarting it");
        return resolveDone(0);
      }
      const ranMs = Date.now() - startedAt;
      delay = ranMs >= stableMs ? minDelay : restarts === 0 ? minDelay : Math.min(delay * 2, maxDelay);
      restarts++;
      log(
        `the server ${describeExit(code, signal)} after ` +
          `${Math.round(ranMs / 1000)} s; starting it again in ` +
          `${Math.round(delay / 100) / 10} s (restart ${restarts})`,
      );
      timer = setTimeout(start, delay);
    });
  };

  const stop = (signal: NodeJS.Signals) => {
    stopping = true;
    if (timer) {
      clearTimeout(timer);
      timer = null;
      resolveDone(0);
    }
    child?.kill(signal);
  };

  start();
  return { done, stop };
}

const isEntry =
  process.argv[1] &&
  /(supervise\.ts|nichewise-supervise\.mjs)$/.test(process.argv[1]) &&
  path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isEntry) {
  const [command, ...args] = process.argv.slice(2);
  if (!command) {
    console.error("usage: nichewise-supervise <command> [args…]   e.g. node build/nichewise-server.mjs");
    process.exit(2);
  }
  const minDelayMs = Number(process.env.NW_RESTART_DELAY_MS) > 0 ? Number(process.env.NW_RESTART_DELAY_MS) : undefined;
  // The server runs React's production code unless told otherwise (it is chosen at import).
  const env = { ...process.env, NODE_ENV: process.env.NODE_ENV ?? "production" };
  const s = supervise({ command, args, env, minDelayMs });
  for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => s.stop(signal));
  s.done.then((code) => process.exit(code));
}
