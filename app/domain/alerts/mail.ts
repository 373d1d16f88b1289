// The frame every alert e-mail shares, live watch and forecast alike: the message's lines, the link
// to the spot, a caution, and why the reader gets it and where to change that. Plain text and HTML
// carry the same words.
import type { TempUnit } from "~/domain/units";

export type Composed = { subject: string; text: string; html: string };

/** Whom an alert e-mail tells about which spot: the site, the links, the site's time zone, the reader's unit. */
export type MailContext = Record<"siteName" | "spotName" | "spotUrl" | "alertsUrl" | "timeZone", string> & {
  unit: TempUnit;
};

const escape = (s: string) =>
  s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

/** Empty lines separate paragraphs in the text and are left out of the HTML. */
export function composeMail(
  subject: string,
  lines: string[],
  c: Pick<MailContext, "spotName" | "spotUrl" | "alertsUrl">,
  caution: string,
  why: string,
): Composed {
  const footer = [
    `Open ${c.spotName}: ${c.spotUrl}`,
    "",
    caution,
    "",
    `${why} Change which alerts you get by e-mail: ${c.alertsUrl}`,
  ];
  const text = [...lines, "", ...footer].join("\n");
  const html = `<!doctype html><html><body style="font-family: Inter, Arial, sans-serif; color: #2b2722; line-height: 1.5">
${lines
  .filter((l) => l !== "")
  .map((l) => `<p>${escape(l)}</p>`)
  .join("\n")}
<p><a href="${escape(c.spotUrl)}" style="color: #a9502b; font-weight: 600">Open ${escape(c.spotName)}</a></p>
<p style="color: #6f675c; font-size: 13px">${escape(caution)}</p>
<p style="color: #6f675c; font-size: 13px">${escape(why)} <a href="${escape(c.alertsUrl)}" style="color: #6f675c">Change which alerts you get by e-mail</a>.</p>
</body></html>`;
  return { subject, text, html };
}
