// What the local SMTP sink received, for the installation admin (and the invitation test): subject,
// recipients, the plain-text body decoded, and the links in it. 404 for everyone else.
import { requireAdmin } from "~/.server/auth";
import { sunkMail } from "~/.server/mail";
import type { Route } from "./+types/api.admin.mail";

// The text/plain part of a nodemailer message, with quoted-printable undone.
function plainText(raw: string) {
  const part = /Content-Type: text\/plain[^\r\n]*\r?\n((?:[^\r\n]+\r?\n)*)\r?\n([\s\S]*?)(?:\r?\n--[^\r\n]+|$)/i.exec(raw);
  if (!part) return "";
  const headers = part[1];
  let body = part[2];
  if (/Content-Transfer-Encoding: quoted-printable/i.test(headers)) {
    body = body.replace(/=\r?\n/g, "");
    body = Buffer.from(body.replace(/=([0-9A-F]{2})/gi, (_m, h: string) => String.fromCharCode(parseInt(h, 16))), "latin1").toString("utf8");
  } else if (/Content-Transfer-Encoding: base64/i.test(headers)) {
    body = Buffer.from(body.replace(/\s+/g, ""), "base64").toString("utf8");
  }
  return body;
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireAdmin(request);
  const to = new URL(request.url).searchParams.get("to")?.toLowerCase();
  const mail = sunkMail()
    .filter((m) => !to || m.to.some((t) => t.toLowerCase() === to))
    .slice(-50)
    .reverse()
    .map((m) => {
      const text = plainText(m.raw);
      return { id: m.id, at: m.at, from: m.from, to: m.to, subject: m.subject, text, links: [...text.matchAll(/https?:\/\/\S+/g)].map((x) => x[0]) };
    });
  return Response.json({ mail }, { headers: { "Cache-Control": "no-store" } });
}
