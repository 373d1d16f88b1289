// The README stays a README (issue 18): what Nichewise is, the two commands, configuration,
// running for real, connecting a sensor, a short layout and links; decision records live in
// docs/decisions/ (one short file each, numbered) and the benchmark diary in docs/benchmark.md.
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(import.meta.dirname, "../..");
const read = (file: string) => readFileSync(path.join(ROOT, file), "utf8");
const readme = read("README.md");
const decisions = readdirSync(path.join(ROOT, "docs/decisions")).filter((f) => f.endsWith(".md"));

function section(markdown: string, heading: string): string {
  const start = markdown.indexOf(`\n## ${heading}\n`);
  if (start < 0) return "";
  const next = markdown.indexOf("\n## ", start + 1);
  return markdown.slice(start, next < 0 ? undefined : next);
}

/** Relative links of a Markdown file, without their anchors; code blocks left out. */
function relativeLinks(markdown: string): string[] {
  const prose = markdown.replace(/```[\s\S]*?```/g, "");
  return [...prose.matchAll(/\]\(([^)\s]+)\)/g)]
    .map((m) => m[1].split("#")[0])
    .filter((target) => target !== "" && !/^[a-z]+:/i.test(target));
}

describe("README", () => {
  it("is short: no decision records or benchmark diary in it", () => {
    expect(readme.split("\n").length).toBeLessThan(400);
    expect(readme).not.toMatch(/^\| figure \| ours \|/m);
    expect(readme).toContain("(docs/benchmark.md)");
  });

  it("lists every decision record, as a link and nothing more", () => {
    const list = section(readme, "Decisions");
    for (const file of decisions) expect(list, file).toContain(`(docs/decisions/${file})`);
    const bullets = list.split("\n").filter((line) => line.startsWith("- "));
    expect(bullets.length).toBe(decisions.length);
    for (const line of bullets) expect(line.length, line).toBeLessThan(160);
  });
});

describe("docs/decisions", () => {
  it("gives each record a number of its own, in its file name and title", () => {
    const numbers = decisions.map((f) => f.slice(0, 4));
    expect(new Set(numbers).size, numbers.join(" ")).toBe(numbers.length);
    for (const file of decisions) {
      expect(file, "NNNN-name.md").toMatch(/^\d{4}-[a-z0-9-]+\.md$/);
      expect(read(`docs/decisions/${file}`).split("\n")[0], file).toMatch(new RegExp(`^# ${file.slice(0, 4)} — `));
    }
  });
});

describe("links", () => {
  const files = [
    "README.md",
    "DEVELOPERS.md",
    ...readdirSync(path.join(ROOT, "docs"), { recursive: true })
      .map(String)
      .filter((f) => f.endsWith(".md"))
      .map((f) => `docs/${f}`),
  ];

  it.each(files)("every relative link in %s leads to a file that exists", (file) => {
    for (const target of relativeLinks(read(file))) {
      expect(existsSync(path.join(ROOT, path.dirname(file), target)), `${file} → ${target}`).toBe(true);
    }
  });
});
