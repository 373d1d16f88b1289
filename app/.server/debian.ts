// Debian packages the project starts itself (PostgreSQL's server; Chromium for the benchmark's
// chart figure): installed with apt-get when running as root, as `npm test` (tests/run.sh) does.
import { execFileSync } from "node:child_process";

export const isRoot = () => process.getuid?.() === 0;

/** Installs a Debian package with apt-get; the caller has checked that this process is root. */
export function aptInstall(pkg: string, log: (s: string) => void = console.log) {
  log(`Installing Debian's ${pkg} package (first run only)…`);
  execFileSync("apt-get", ["update", "-qq"], { stdio: "inherit" });
  execFileSync("apt-get", ["install", "-y", "-qq", pkg], {
    stdio: "inherit",
    env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
  });
}
