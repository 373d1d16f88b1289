// The development mail sink is bounded (issue 14): a message over 256 KB is refused and not kept,
// only the newest 500 messages and 32 MB are kept, a message takes at most 50 recipients, and the
// admin's list of it is paginated (?page=).
import { describe, expect, it } from "vitest";
import nodemailer from "nodemailer";
import { createSession, generateSessionToken } from "~/.server/auth";
import { sendMail, SINK_KEEP, SINK_MAX_MESSAGE_BYTES, SINK_MAX_TOTAL_BYTES, sunkMail } from "~/.server/mail";
import { loader as adminLoader } from "~/routes/admin";
import { loader as mailApi } from "~/routes/api.admin.mail";
import { makeUser, useMailSink } from "./helpers";

const sink = useMailSink();

const lines = (chars: number) => Array.from({ length: Math.ceil(chars / 64) }, () => "y".repeat(63)).join("\n");
const rawBytes = () => sunkMail().reduce((n, m) => n + m.raw.length, 0);

describe("the mail sink's bounds", () => {
  it("refuses a message over 256 KB and keeps nothing of it", async () => {
    const before = sunkMail().length;
    await expect(
      sendMail({
        to: "big@example.test",
        subject: "too big",
        text: lines(SINK_MAX_MESSAGE_BYTES + 10_000),
        html: "<p>x</p>",
      }),
    ).rejects.toThrow(/552|larger/);
    expect(sunkMail().length).toBe(before);
    // A message within the limit still arrives.
    await sendMail({ to: "ok@example.test", subject: "fits", text: lines(100_000), html: "<p>x</p>" });
    expect(sunkMail().at(-1)!.subject).toBe("fits");
  });

  it(`keeps only the newest ${SINK_KEEP} messages`, async () => {
    const t = nodemailer.createTransport({
      host: "127.0.0.1",
      port: sink.port,
      ignoreTLS: true,
      pool: true,
      maxConnections: 2,
    } as never);
    for (let i = 0; i < SINK_KEEP + 20; i++)
      await t.sendMail({ from: "a@example.test", to: "many@example.test", subject: `n${i}`, text: "." });
    t.close();
    expect(sunkMail().length).toBe(SINK_KEEP);
    expect(sunkMail().at(-1)!.subject).toBe(`n${SINK_KEEP + 19}`);
    expect(sunkMail()[0].subject).toBe("n20");
  });

  it("keeps at most 32 MB, dropping the oldest", async () => {
    const t = nodemailer.createTransport({
      host: "127.0.0.1",
      port: sink.port,
      ignoreTLS: true,
      pool: true,
      maxConnections: 2,
    } as never);
    const body = lines(240_000);
    const n = Math.ceil(SINK_MAX_TOTAL_BYTES / 240_000) + 5;
    for (let i = 0; i < n; i++)
      await t.sendMail({ from: "a@example.test", to: "bulk@example.test", subject: `bulk${i}`, text: body });
    t.close();
    expect(rawBytes()).toBeLessThanOrEqual(SINK_MAX_TOTAL_BYTES);
    expect(sunkMail().at(-1)!.subject).toBe(`bulk${n - 1}`);
  });

  it("takes at most 50 recipients a message", async () => {
    const to = Array.from({ length: 60 }, (_, i) => `r${i}@example.test`);
    const t = nodemailer.createTransport({ host: "127.0.0.1", port: sink.port, ignoreTLS: true } as never);
    const info = await t.sendMail({ from: "a@example.test", to, subject: "crowd", text: "." });
    expect(info.rejected).toHaveLength(10);
    expect(sunkMail().at(-1)!.to).toEqual(to.slice(0, 50));
  });
});

describe("the admin's mail list is paginated", () => {
  it("?page= walks the kept mail newest first; a bad page number is a 400 in the API", async () => {
    const admin = await makeUser({ isAdmin: true });
    const token = generateSessionToken();
    await createSession(token, admin.id);
    const get = (path: string) =>
      new Request(`http://127.0.0.1${path}`, { headers: { Cookie: `nw_session=${token}` } });
    const t = nodemailer.createTransport({
      host: "127.0.0.1",
      port: sink.port,
      ignoreTLS: true,
      pool: true,
      maxConnections: 2,
    } as never);
    for (let i = 0; i < 120; i++)
      await t.sendMail({ from: "a@example.test", to: "pages@example.test", subject: `page-mail ${i}`, text: "." });
    t.close();

    const first = (await (
      await mailApi({ request: get("/api/admin/mail?to=pages@example.test"), params: {}, context: {} } as never)
    ).json()) as { mail: { subject: string }[]; page: number; pages: number; total: number };
    expect(first).toMatchObject({ page: 1, pages: 3, total: 120 });
    expect(first.mail).toHaveLength(50);
    expect(first.mail[0].subject).toBe("page-mail 119");
    const third = (await (
      await mailApi({ request: get("/api/admin/mail?to=pages@example.test&page=3"), params: {}, context: {} } as never)
    ).json()) as { mail: { subject: string }[] };
    expect(third.mail.map((m) => m.subject)).toEqual(Array.from({ length: 20 }, (_, i) => `page-mail ${19 - i}`));
    await expect(
      mailApi({ request: get("/api/admin/mail?page=abc"), params: {}, context: {} } as never),
    ).rejects.toMatchObject({ init: { status: 400 } });

    const page = (await adminLoader({ request: get("/admin?page=2"), params: {}, context: {} } as never)) as {
      mail: { page: number; pages: number; items: unknown[] };
    };
    expect(page.mail.page).toBe(2);
    expect(page.mail.items).toHaveLength(20);
    expect(page.mail.pages).toBe(Math.ceil(sunkMail().length / 20));
  });
});
