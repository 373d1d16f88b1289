// Outgoing mail through nodemailer. In development and tests it goes to a local SMTP sink on
// loopback (the only fake in the product, standing in for a hosted mail service at the network
// edge); the admin can read what the sink received. In production SMTP_URL names a real server.
import nodemailer, { type Transporter } from "nodemailer";
import { SMTPServer } from "smtp-server";
import { env } from "~/.server/env";

export type SunkMail = { id: number; at: Date; from: string; to: string[]; subject: string; raw: string };

type Holder = { transport?: Transporter; sunk: SunkMail[]; nextId: number };
const holder = ((globalThis as Record<string, unknown>).__nichewiseMail ??= { sunk: [], nextId: 1 }) as Holder;
const KEEP = 500;

export function configureMailer(url: string) {
  holder.transport = nodemailer.createTransport(url.startsWith("smtp://127.0.0.1") ? { url, ignoreTLS: true } as never : url);
}

export type Mail = { to: string; subject: string; text: string; html: string };

export async function sendMail(mail: Mail) {
  if (!holder.transport) throw new Error("Mailer not configured");
  await holder.transport.sendMail({ from: env().MAIL_FROM, ...mail });
}

export const sunkMail = () => holder.sunk;

export async function startMailSink(opts: { port: number; host?: string; log?: (s: string) => void }) {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 2 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", () => {
        const raw = Buffer.concat(chunks).toString("utf8");
        const subject = decodeHeader(/^Subject: (.*(?:\r?\n[ \t].*)*)/im.exec(raw)?.[1] ?? "");
        holder.sunk.push({
          id: holder.nextId++,
          at: new Date(),
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
          to: session.envelope.rcptTo.map((r) => r.address),
          subject,
          raw,
        });
        if (holder.sunk.length > KEEP) holder.sunk.splice(0, holder.sunk.length - KEEP);
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
            : Buffer.from(text.replace(/_/g, " ").replace(/=([0-9A-F]{2})/gi, (_x, h: string) => String.fromCharCode(parseInt(h, 16))), "latin1"),
        ),
      ).toString("utf8"),
    )
    .trim();
}
