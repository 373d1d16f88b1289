// What the local SMTP sink received, for the installation admin (and the invitation test): subject,
// recipients, the plain-text body decoded, and the links in it. 404 for everyone else.
import { requireAdmin } from "~/.server/auth";
import { data } from "react-router";
import { toId } from "~/.server/ids";
import { sunkMailPage } from "~/.server/mail";
import type { Route } from "./+types/api.admin.mail";

// The text/plain part of a nodemailer message, with quoted-printable undone.
function plainText(raw: string) {
  const part = /Content-Type: text\/plain[^\r\n]*\r?\n((?:[^\r\n]+\r?\n)*)\r?\n([\s\S]*?)(?:\r?\n--[^\r\n]+|$)/i.exec(
    raw,
  );
  if (!part) return "";
  const headers = part[1];
  let body = part[2];
  if (/Content-Transfer-Encoding: quoted-printable/i.test(headers)) {
    body = body.replace(/=\r?\n/g, "");
    body = Buffer.from(
      body.replace(/=([0-9A-F]{2})/gi, (_m, h: string) => String.fromCharCode(parseInt(h, 16))),
      "latin1",
    ).toString("utf8");
  } else if (/Content-Transfer-Encoding: base64/i.test(headers)) {
    body = Buffer.from(body.replace(/\s+/g, ""), "base64").toString("utf8");
  }
  return body;
}

/** ?page= counts from 1, newest first, 50 a page; ?to= keeps mail to one address. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireAdmin(request);
  const q = new URL(request.url).searchParams;
  const pageParam = q.get("page");
  const page = pageParam === null ? 1 : toId(pageParam);
  if (page === null) throw data("?page= is a page number from 1.", { status: 400 });
  const list = sunkMailPage({ page, perPage: 50, to: q.get("to")?.slice(0, 320) });
  const mail = list.mail.map((m) => {
    const text = plainText(m.raw);
    return {
      id: m.id,
      at: m.at,
      from: m.from,
      to: m.to,
      subject: m.subject,
      text,
      links: [...text.matchAll(/https?:\/\/\S+/g)].map((x) => x[0]),
    };
  });
  return Response.json(
    { mail, page: list.page, pages: list.pages, total: list.total },
    { headers: { "Cache-Control": "no-store" } },
  );
}
