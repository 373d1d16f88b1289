// A real Mosquitto from Debian's package, started by a test on loopback with a generated config: a
// password file made with mosquitto_passwd, and optionally a TLS listener with a CA and server
// certificate made with openssl. Stands for the broker a grower already runs at home.
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { createServer, connect } from "node:net";
import { tmpdir, userInfo } from "node:os";
import path from "node:path";

export const MOSQUITTO = "/usr/sbin/mosquitto";

export type Mosquitto = {
  port: number;
  tlsPort: number | null;
  caPem: string | null;
  users: Record<string, string>;
  stop: () => Promise<void>;
  /** Starts it again on the same ports (after stop), as a broker restarted by its owner. */
  restart: () => Promise<void>;
  dir: string;
};

export async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, "127.0.0.1", () => r()));
  const port = (s.address() as { port: number }).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

async function waitForPort(port: number, until: number) {
  for (;;) {
    const ok = await new Promise<boolean>((resolve) => {
      const c = connect({ port, host: "127.0.0.1" }, () => {
        c.destroy();
        resolve(true);
      });
      c.on("error", () => resolve(false));
    });
    if (ok) return;
    if (Date.now() > until) throw new Error(`mosquitto did not open port ${port}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

function makeCertificates(dir: string) {
  const run = (args: string[]) => execFileSync("openssl", args, { cwd: dir, stdio: "ignore" });
  run([
    "req",
    "-x509",
    "-newkey",
    "rsa:2048",
    "-nodes",
    "-keyout",
    "ca.key",
    "-out",
    "ca.crt",
    "-days",
    "2",
    "-subj",
    "/CN=Test home CA",
  ]);
  run([
    "req",
    "-newkey",
    "rsa:2048",
    "-nodes",
    "-keyout",
    "server.key",
    "-out",
    "server.csr",
    "-subj",
    "/CN=localhost",
  ]);
  writeFileSync(path.join(dir, "san.ext"), "subjectAltName=DNS:localhost,IP:127.0.0.1\n");
  run([
    "x509",
    "-req",
    "-in",
    "server.csr",
    "-CA",
    "ca.crt",
    "-CAkey",
    "ca.key",
    "-CAcreateserial",
    "-out",
    "server.crt",
    "-days",
    "2",
    "-extfile",
    "san.ext",
  ]);
}

export async function startMosquitto(opts: {
  users: Record<string, string>;
  tls?: boolean;
  extra?: string[];
}): Promise<Mosquitto> {
  const dir = mkdtempSync(path.join(tmpdir(), "nw-mosquitto-"));
  const passwd = path.join(dir, "passwd");
  writeFileSync(passwd, "");
  for (const [user, password] of Object.entries(opts.users))
    execFileSync("mosquitto_passwd", ["-b", passwd, user, password], { stdio: "ignore" });
  const port = await freePort();
  const tlsPort = opts.tls ? await freePort() : null;
  let caPem: string | null = null;
  const lines = [
    // Run as root it would switch to the "mosquitto" user, who cannot read this private folder.
    `user ${userInfo().username}`,
    "per_listener_settings false",
    "allow_anonymous false",
    `password_file ${passwd}`,
    "persistence false",
    "max_queued_messages 100000",
    `listener ${port} 127.0.0.1`,
  ];
  if (tlsPort) {
    makeCertificates(dir);
    caPem = (await import("node:fs")).readFileSync(path.join(dir, "ca.crt"), "utf8");
    lines.push(
      `listener ${tlsPort} 127.0.0.1`,
      `cafile ${dir}/ca.crt`,
      `certfile ${dir}/server.crt`,
      `keyfile ${dir}/server.key`,
    );
  }
  lines.push(...(opts.extra ?? []));
  const conf = path.join(dir, "mosquitto.conf");
  writeFileSync(conf, lines.join("\n") + "\n");
  let child: ChildProcess | null = null;
  const start = async () => {
    child = spawn(MOSQUITTO, ["-c", conf], { stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr!.on("data", (d) => (stderr = (stderr + d).slice(-2000)));
    const until = Date.now() + 10_000;
    try {
      await waitForPort(port, until);
      if (tlsPort) await waitForPort(tlsPort, until);
    } catch (err) {
      child.kill("SIGKILL");
      throw new Error(`${(err as Error).message}: ${stderr}`, { cause: err });
    }
  };
  const stop = async () => {
    const c = child;
    child = null;
    if (!c || c.exitCode !== null) return;
    await new Promise<void>((resolve) => {
      c.once("exit", () => resolve());
      c.kill("SIGKILL");
    });
  };
  await start();
  return {
    port,
    tlsPort,
    caPem,
    users: opts.users,
    dir,
    restart: start,
    stop: async () => {
      await stop();
    },
  };
}

export function removeMosquittoDir(m: Mosquitto) {
  rmSync(m.dir, { recursive: true, force: true });
}
