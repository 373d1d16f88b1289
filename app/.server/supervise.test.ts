// The supervisor `npm start` runs: a server that dies is started again, a clean stop is not.
// Uses a tiny child script in place of the server; outcomes only, no timing assertions.
import { spawn } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";

const dir = mkdtempSync(path.join(tmpdir(), "nw-supervise-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const CHILD = `
import { appendFileSync } from "node:fs";
const file = process.argv[2];
appendFileSync(file, "start " + process.pid + "\\n");
process.on("SIGTERM", () => { appendFileSync(file, "term " + process.pid + "\\n"); process.exit(0); });
if (process.argv[3] === "clean") process.exit(0);
setInterval(() => {}, 1000);
`;

const lines = (file: string) => {
  try {
    return readFileSync(file, "utf8").trim().split("\n").filter(Boolean);
  } catch {
    return [];
  }
};

async function until<T>(what: string, f: () => T | undefined | false) {
  for (let i = 0; i < 400; i++) {
    const v = f();
    if (v) return v;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`gave up waiting for ${what}`);
}

function startSupervisor(file: string, extra: string[] = []) {
  const child = path.join(dir, "child.mjs");
  writeFileSync(child, CHILD);
  const proc = spawn(process.execPath, ["--import", "tsx", "app/.server/supervise.ts", "node", child, file, ...extra], {
    env: { ...process.env, NW_RESTART_DELAY_MS: "50" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  proc.stdout.on("data", (d) => (out += d));
  proc.stderr.on("data", (d) => (out += d));
  const exited = new Promise<number | null>((resolve) => proc.once("exit", (code) => resolve(code)));
  return { proc, exited, output: () => out };
}

describe("the server supervisor", () => {
  it("starts a killed server again, says so, passes SIGTERM on and does not restart after the clean stop", async () => {
    const file = path.join(dir, "killed.log");
    const s = startSupervisor(file);
    const first = await until("the first start", () => lines(file).find((l) => l.startsWith("start ")));
    process.kill(Number(first.split(" ")[1]), "SIGKILL");
    const second = await until("the restart", () => lines(file).filter((l) => l.startsWith("start "))[1]);
    expect(second).not.toBe(first);
    await until("the restart's log line", () => s.output().includes("starting it again"));
    expect(s.output()).toMatch(/was killed \(SIGKILL\).*starting it again/);

    s.proc.kill("SIGTERM");
    expect(await s.exited).toBe(0);
    expect(lines(file)).toEqual([first, second, `term ${second.split(" ")[1]}`]);
  });

  it("leaves a server that exits cleanly stopped", async () => {
    const file = path.join(dir, "clean.log");
    const s = startSupervisor(file, ["clean"]);
    expect(await s.exited).toBe(0);
    expect(lines(file)).toHaveLength(1);
    expect(s.output()).toContain("not restarting");
  });
});
