// The arrows between the folders of app/ run one way: lib (small helpers) under domain (pure
// concepts, no I/O), domain under the server, components and routes. A component takes its prop
// types from domain, never from a server module, so nothing of the server is one import away from
// the browser bundle.
import { readdirSync, readFileSync } from "node:fs";
import { join, relative } from "node:path";
import { describe, expect, it } from "vitest";

const APP = new URL(".", import.meta.url).pathname;

function sources(dir: string): string[] {
  return readdirSync(join(APP, dir), { recursive: true, encoding: "utf8" })
    .filter((f) => /\.(ts|tsx)$/.test(f) && !/\.test\.tsx?$/.test(f) && !f.includes("__snapshots__"))
    .map((f) => join(dir, f));
}

/** Every `~/…` module a file imports (`import`, `import type`, `export … from`, `import()`). */
function importsOf(file: string): string[] {
  const text = readFileSync(join(APP, file), "utf8");
  return [...text.matchAll(/(?:from\s+|import\s*\(\s*|import\s+)["'](~\/[^"']+)["']/g)].map((m) => m[1]);
}

function offending(dir: string, forbidden: RegExp): string[] {
  return sources(dir).flatMap((f) =>
    importsOf(f)
      .filter((m) => forbidden.test(m))
      .map((m) => `${relative(".", f)} -> ${m}`),
  );
}

describe("arrows run one way", () => {
  it("lib imports nothing of domain, the server, components, forms or routes", () => {
    expect(offending("lib", /^~\/(domain|\.server|db|components|forms|routes)\//)).toEqual([]);
  });

  it("domain imports nothing of the server, the database schema, components, forms or routes", () => {
    expect(offending("domain", /^~\/(\.server|db|components|forms|routes)\//)).toEqual([]);
  });

  it("components take nothing from server modules", () => {
    expect(offending("components", /^~\/\.server\//)).toEqual([]);
  });
});
