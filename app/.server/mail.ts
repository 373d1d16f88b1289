// Outgoing mail through nodemailer. In development and tests it goes to a local SMTP sink on
// loopback (the only fake in the product, standing in for a hosted mail service at the network
// edge); the admin can read what the sink received. In production SMTP_URL names a real server.
// The sink is bounded: a message over SINK_MAX_MESSAGE_BYTES is refused (552) and not buffered past
// the limit, only the newest SINK_KEEP messages and SINK_MAX_TOTAL_BYTES are kept, and it takes a
// few connections and recipients at a time.
import nodemailer, { type Transporter } from "nodemailer";
import { SMTPServer } from "smtp-server";
import { env } from "~/.server/env";
import { kept } from "~/.server/kept";

export type SunkMail = { id: number; at: Date; from: string; to: string[]; subject: string; raw: string };

type Holder = { transport?: Transporter; sunk: SunkMail[]; nextId: number; bytes?: number };
const holder = kept<Holder>("mail", () => ({ sunk: [], nextId: 1 }));
export const SINK_KEEP = 500;
export const SINK_MAX_MESSAGE_BYTES = 256 * 1024;
export const SINK_MAX_TOTAL_BYTES = 32 * 1024 * 1024;
// The mailer opens one connection per message, and a burst (a cold snap mailing every member of
// many sites, a batch of invitations) opens them at once: a lower bound refused real mail in tests.
const SINK_MAX_CLIENTS = 200;
const SINK_MAX_RECIPIENTS = 50;

export function configureMailer(url: string) {
  holder.transport = nodemailer.createTransport(
    url.startsWith("smtp://127.0.0.1") ? ({ url, ignoreTLS: true } as never) : url,
  );
}

export type Mail = { to: string; subject: string; text: string; html: string };

export async function sendMail(mail: Mail) {
  if (!holder.transport) throw new Error("Mailer not configured");
  await holder.transport.sendMail({ from: env().MAIL_FROM, ...mail });
}

export const sunkMail = () => holder.sunk;

/** One page of what the sink kept, newest first, optionally only mail to one address. */
export function sunkMailPage(opts: { page?: number; perPage?: number; to?: string | null } = {}) {
  const perPage = Math.max(1, Math.min(opts.perPage ?? 50, 200));
  const to = opts.to?.toLowerCase();
  const matching = to ? holder.sunk.filter((m) => m.to.some((t) => t.toLowerCase() === to)) : holder.sunk;
  const pages = Math.max(1, Math.ceil(matching.length / perPage));
  const page = Math.min(Math.max(1, Math.floor(opts.page ?? 1) || 1), pages);
  const end = matching.length - (page - 1) * perPage;
  return {
    page,
    pages,
    perPage,
    total: matching.length,
    mail: matching.slice(Math.max(0, end - perPage), end).reverse(),
  };
}

// Sizes are counted in characters of the decoded text, which is what the process holds.
function keep(mail: SunkMail) {
  holder.bytes ??= holder.sunk.reduce((n, m) => n + m.raw.length, 0);
  holder.sunk.push(mail);
  holder.bytes += mail.raw.length;
  while (holder.sunk.length > 1 && (holder.sunk.length > SINK_KEEP || holder.bytes > SINK_MAX_TOTAL_BYTES))
    holder.bytes -= holder.sunk.shift()!.raw.length;
}

export async function startMailSink(opts: { port: number; host?: string; log?: (s: string) => void }) {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: SINK_MAX_MESSAGE_BYTES,
    maxClients: SINK_MAX_CLIENTS,
    socketTimeout: 30_000,
    onRcptTo(_address, session, callback) {
      if (session.envelope.rcptTo.length >= SINK_MAX_RECIPIENTS) {
        callback(
          Object.assign(new Error(`At most ${SINK_MAX_RECIPIENTS} recipients a message`), { responseCode: 452 }),
        );
        return;
      }
      callback();
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      let bytes = 0;
      // The stream runs to its end whatever its size (the client is still sending); only the bytes
      // within the limit are held.
      stream.on("data", (c: Buffer) => {
        bytes += c.length;
        if (bytes <= SINK_MAX_MESSAGE_BYTES) chunks.push(c);
      });
      stream.on("end", () => {
        if (stream.sizeExceeded || bytes > SINK_MAX_MESSAGE_BYTES) {
          callback(
            Object.assign(new Error(`Message larger than ${SINK_MAX_MESSAGE_BYTES / 1024} KB`), { responseCode: 552 }),
          );
          return;
        }
        const raw = Buffer.concat(chunks).toString("utf8");
        const subject = decodeHeader(/^Subject: (.*(?:\r?\n[ \t].*)*)/im.exec(raw)?.[1] ?? "");
        keep({
          id: holder.nextId++,
          at: new Date(),
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address.slice(0, 320) : "",
          to: session.envelope.rcptTo.map((r) => r.address.slice(0, 320)),
          subject: subject.slice(0, 500),
          raw,
        });
        callback();
      });
    },
  });
  const host = opts.host ?? "127.0.0.1";
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, host, () => resolve());
  });
  const port = (server.server.address() as { port: number }).port;
  opts.log?.(`Mail sink (SMTP) on ${host}:${port}`);
  return { port, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

// RFC 2047 encoded words, as nodemailer writes non-ASCII subjects: the space between adjacent words
// is not part of the text, and a character may be split across two words, so runs decode together.
function decodeHeader(value: string) {
  return value
    .replace(/\r?\n[ \t]/g, " ")
    .replace(/(\?=)\s+(?==\?)/g, "$1")
    .replace(/(?:=\?utf-8\?[bq]\?[^?]*\?=)+/gi, (run) =>
      Buffer.concat(
        [...run.matchAll(/=\?utf-8\?([bq])\?([^?]*)\?=/gi)].map(([, enc, text]) =>
          enc.toLowerCase() === "b"
            ? Buffer.from(text, "base64")
            : Buffer.from(
                text
                  .replace(/_/g, " ")
                  .replace(/=([0-9A-F]{2})/gi, (_x, h: string) => String.fromCharCode(parseInt(h, 16))),
                "latin1",
              ),
        ),
      ).toString("utf8"),
    )
    .trim();
}
