// `next` after sign-in or sign-up: only a path on this site (OWASP Unvalidated Redirects and
// Forwards Cheat Sheet). Payloads are the ones browsers read as another host: a tab or newline
// (dropped from URLs by the WHATWG URL parser), backslashes (read as slashes), protocol-relative
// and absolute URLs.
import { describe, expect, it } from "vitest";
import { safeNext } from "~/forms/auth";

describe("safeNext", () => {
  it("sends off-site targets home", () => {
    for (const next of [
      "/\\evil.example",
      "/\t/evil.example/x",
      "/\n/evil.example",
      "//evil.example/x",
      "///evil.example",
      "https://evil.example/x",
      "http:evil.example",
      "javascript:alert(1)",
      "/\\/evil.example",
      "\\\\evil.example",
      "/./\\evil.example",
      "/.//evil.example",
      " //evil.example",
      "",
      "settings",
    ]) {
      expect(safeNext(next), JSON.stringify(next)).toBe("/");
    }
    expect(safeNext(decodeURIComponent("/%09/evil.host/x"))).toBe("/");
    expect(safeNext(null)).toBe("/");
  });

  it("keeps a path on this site with its query and fragment", () => {
    expect(safeNext("/sites/1/spots/2?year=2025#chart")).toBe("/sites/1/spots/2?year=2025#chart");
    expect(safeNext("/invite/abc")).toBe("/invite/abc");
    expect(safeNext("/")).toBe("/");
  });
});
