// The environment's start-up checks for what the web edge reads: TRUST_PROXY, and whether the demo
// household (with the README's published logins) is seeded.
import { describe, expect, it } from "vitest";
import { demoPolicy, parseEnv } from "~/.server/env";

describe("TRUST_PROXY", () => {
  it("is off by default and takes a hop count or addresses, subnets and Express's named ranges", () => {
    expect(parseEnv({}).TRUST_PROXY).toBe(0);
    expect(parseEnv({ TRUST_PROXY: "1" }).TRUST_PROXY).toBe(1);
    expect(parseEnv({ TRUST_PROXY: "loopback, 10.0.0.0/8,::1" }).TRUST_PROXY).toEqual([
      "loopback",
      "10.0.0.0/8",
      "::1",
    ]);
  });

  it("refuses anything else, naming the variable", () => {
    for (const bad of ["true", "yes", "*", "10.0.0.0/33", "example.org", "11", "10.0.0.1/8/1"]) {
      expect(() => parseEnv({ TRUST_PROXY: bad }), bad).toThrow(/TRUST_PROXY/);
    }
  });
});

describe("the demo household", () => {
  const policy = (env: Record<string, string>) => demoPolicy(parseEnv(env));

  it("is seeded by default on loopback, so that `npm install && npm start` is the demo", () => {
    expect(policy({}).seed).toBe(true);
    expect(policy({ HOST: "127.0.0.1" }).seed).toBe(true);
    expect(policy({ HOST: "::1" }).seed).toBe(true);
    expect(policy({ HOST: "localhost" }).seed).toBe(true);
  });

  it("is not seeded beyond loopback unless NW_DEMO=1 asks for it, and the log says which", () => {
    for (const HOST of ["0.0.0.0", "::", "192.168.1.20", "grow.example.org"]) {
      const p = policy({ HOST });
      expect(p.seed, HOST).toBe(false);
      expect(p.why).toMatch(/beyond loopback.*NW_DEMO=1.*admin:create/);
    }
    const asked = policy({ HOST: "0.0.0.0", NW_DEMO: "1" });
    expect(asked.seed).toBe(true);
    expect(asked.why).toMatch(/open to anyone/);
    expect(policy({ NW_DEMO: "0" }).seed).toBe(false);
  });
});
