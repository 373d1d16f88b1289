import { useEffect } from "react";
import { Link, useRevalidator } from "react-router";
import { requireAdmin } from "~/.server/auth";
import { ingestHealth } from "~/.server/health";
import { toId } from "~/.server/ids";
import { sunkMailPage } from "~/.server/mail";
import { timeAgo } from "~/lib/date-words";
import type { Route } from "./+types/admin";

export const meta: Route.MetaFunction = () => [{ title: "Ingest health · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireAdmin(request);
  // A page number that is not one shows the first page (the list moves as mail arrives anyway).
  const page = toId(new URL(request.url).searchParams.get("page")) ?? 1;
  const list = sunkMailPage({ page, perPage: 20 });
  return {
    health: await ingestHealth(),
    now: Date.now(),
    mail: {
      page: list.page,
      pages: list.pages,
      total: list.total,
      items: list.mail.map((m) => ({ id: m.id, at: m.at, to: m.to, subject: m.subject })),
    },
  };
}

const mb = (b: number) => (b / 1024 / 1024).toFixed(1);

export default function Admin({ loaderData }: Route.ComponentProps) {
  const { health, now, mail } = loaderData;
  const revalidator = useRevalidator();
  useEffect(() => {
    const t = setInterval(() => {
      if (document.visibilityState === "visible" && revalidator.state === "idle") revalidator.revalidate();
    }, 5000);
    return () => clearInterval(t);
  }, [revalidator]);
  const lastHour = health.perMinute.reduce((n, r) => n + r.n, 0);
  return (
    <main className="mx-auto max-w-6xl space-y-6 px-4 py-8 sm:px-6">
      <h1 className="h1">Ingest health</h1>
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <Tile
          label="Broker"
          value={health.broker.up ? "Up" : "Not running"}
          note={"port" in health.broker ? `MQTT ${health.broker.port}, WebSocket ${health.broker.wsPort}` : ""}
        />
        <Tile
          label="Sensors connected now"
          value={"connected" in health.broker ? String(health.broker.connected) : "–"}
        />
        <Tile
          label="Readings, last hour"
          value={lastHour.toLocaleString("en")}
          note={`${Math.round(lastHour / 60)} per minute`}
        />
        <Tile
          label="Writer commit"
          value={health.writer.p50 != null ? `${health.writer.p50.toFixed(1)} ms` : "–"}
          note={
            health.writer.p99 != null
              ? `p99 ${health.writer.p99.toFixed(1)} ms · ${health.writer.failures} failed batches`
              : ""
          }
        />
      </div>
      <section className="card">
        <h2 className="h2 mb-3">Rejected messages by reason</h2>
        {health.reasons.length === 0 ? (
          <p className="text-muted">Nothing rejected.</p>
        ) : (
          <table className="table">
            <thead>
              <tr>
                <th>Reason</th>
                <th>Count</th>
                <th>Latest</th>
              </tr>
            </thead>
            <tbody>
              {health.reasons.map((r) => (
                <tr key={r.reason}>
                  <td>{r.reason}</td>
                  <td>{r.n}</td>
                  <td>{timeAgo(r.last, now)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        <h3 className="mt-6 mb-2 font-semibold">Latest examples</h3>
        <ul className="space-y-2 text-sm" data-testid="rejections">
          {health.latest.map((r) => (
            <li key={r.id} className="rounded-[0.2rem] bg-paper p-2">
              <p>
                <span className="font-medium">{r.reason}</span> · {r.source}
                {r.sensor_id ? ` · sensor ${r.sensor_id}` : ""} · {timeAgo(r.at, now)}
              </p>
              <code className="block break-all text-xs text-muted">
                {r.topic ? `${r.topic}: ` : ""}
                {r.payload}
              </code>
            </li>
          ))}
        </ul>
      </section>
      <div className="grid gap-6 lg:grid-cols-2">
        <section className="card">
          <h2 className="h2 mb-3">Database</h2>
          <p className="mb-3 text-sm text-muted">
            Readings from {health.range.oldest ? new Date(health.range.oldest).toLocaleDateString("en-GB") : "–"} to{" "}
            {health.range.newest ? timeAgo(health.range.newest, now) : "–"} (about{" "}
            {Number(health.range.total ?? 0).toLocaleString("en")} rows)
          </p>
          <table className="table">
            <tbody>
              {health.sizes.map((s) => (
                <tr key={s.name}>
                  <td>{s.name}</td>
                  <td className="text-right">{mb(s.bytes)} MB</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
        <section className="card">
          <h2 className="h2 mb-3">Mail sink</h2>
          <p className="mb-3 text-sm text-muted">
            Messages the local SMTP sink received (development and demo only), newest first; it keeps the last 500, each
            at most 256 KB.
          </p>
          {mail.total === 0 ? <p className="text-muted">None yet.</p> : null}
          <ul className="space-y-2 text-sm" data-testid="sunk-mail">
            {mail.items.map((m) => (
              <li key={m.id} className="break-words">
                <span className="font-medium">{m.subject}</span> → {m.to.join(", ")} · {timeAgo(m.at, now)}
              </li>
            ))}
          </ul>
          {mail.pages > 1 ? (
            <nav className="mt-3 flex items-center justify-between text-sm" aria-label="Mail pages">
              {mail.page > 1 ? (
                <Link className="link" to={`?page=${mail.page - 1}`}>
                  ← Newer
                </Link>
              ) : (
                <span />
              )}
              <span className="text-muted">
                Page {mail.page} of {mail.pages} ({mail.total} messages)
              </span>
              {mail.page < mail.pages ? (
                <Link className="link" to={`?page=${mail.page + 1}`}>
                  Older →
                </Link>
              ) : (
                <span />
              )}
            </nav>
          ) : null}
        </section>
      </div>
    </main>
  );
}

function Tile({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="card">
      <p className="text-sm text-muted">{label}</p>
      <p className="mt-1 text-2xl font-semibold tabular-nums">{value}</p>
      {note ? <p className="mt-1 text-sm text-muted">{note}</p> : null}
    </div>
  );
}
