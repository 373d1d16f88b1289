import { describe, expect, it } from "vitest";
import { composeMail } from "./mail";

const links = {
  spotName: "Sill <east>",
  spotUrl: "https://example.test/s?a=1&b=2",
  alertsUrl: "https://example.test/a",
};

describe("composeMail", () => {
  it("puts the lines, the link, the caution and the reason in the text, in that order", () => {
    const m = composeMail("Subject", ["First.", "", "Second."], links, "Be careful.", "You asked.");
    expect(m.subject).toBe("Subject");
    expect(m.text).toBe(
      [
        "First.",
        "",
        "Second.",
        "",
        "Open Sill <east>: https://example.test/s?a=1&b=2",
        "",
        "Be careful.",
        "",
        "You asked. Change which alerts you get by e-mail: https://example.test/a",
      ].join("\n"),
    );
  });

  it("escapes what it puts into the HTML and leaves out empty lines (OWASP: HTML entity encoding)", () => {
    const m = composeMail("S", ['a < b & "c"', ""], links, "Care.", "Why.");
    expect(m.html).toContain("<p>a &lt; b &amp; &quot;c&quot;</p>");
    expect(m.html).toContain('href="https://example.test/s?a=1&amp;b=2"');
    expect(m.html).toContain("Open Sill &lt;east&gt;</a>");
    expect(m.html).not.toContain("<p></p>");
    expect(m.html).toContain("Change which alerts you get by e-mail</a>.");
  });
});
