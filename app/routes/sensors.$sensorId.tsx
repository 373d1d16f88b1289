import { parseWithZod } from "@conform-to/zod/v4";
import { useEffect, useState } from "react";
import { data, Form, redirect, useFetcher, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { env } from "~/.server/env";
import {
  assignUnplaced,
  movePlacementStart,
  placeFromForm,
  removeSensorFromSpot,
  splitPlacement,
  unplacedReadings,
  placementHistory,
} from "~/.server/placements";
import { deleteSensor, PlacementError, rotateSensorSecret, saveSensor, getSensor } from "~/.server/sensors.server";
import { getSite } from "~/.server/sites";
import { listSpots } from "~/.server/spots";
import { PlaceSensorForm, PlacementEditor, PlacingTips } from "~/components/placement";
import { CopyBlock, useSecretFromFragment } from "~/components/sensor-secret";
import { useNow } from "~/components/use-now";
import { calibrationSchema } from "~/forms/sensor";
import { placementEditSchema } from "~/lib/placements";
import { parseLocalDateTime } from "~/lib/time";
import { formatInZone, timeAgo } from "~/lib/date-words";
import type { Route } from "./+types/sensors.$sensorId";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.sensor.name ?? "Sensor"} · Nichewise` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const { siteId, role } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const sensor = await getSensor(siteId, params.sensorId);
  const site = await getSite(siteId);
  const e = env();
  const origin = new URL(request.url).origin;
  return {
    now: Date.now(),
    role,
    site,
    sensor: { ...sensor, secretHash: undefined },
    spots: await listSpots(siteId),
    history: await placementHistory({ sensorId: sensor.id }),
    unplaced: await unplacedReadings(sensor.id),
    connect: {
      host: e.MQTT_PUBLIC_HOST ?? (e.MQTT_HOST === "0.0.0.0" ? new URL(request.url).hostname : e.MQTT_HOST),
      port: context.services.broker?.port ?? e.MQTT_PORT,
      wsPort: context.services.broker?.wsPort ?? e.MQTT_WS_PORT,
      httpUrl: `${origin}/api/ingest`,
    },
  };
}

const PLACEMENT_EDITS = new Set(["move-start", "split", "assign"]);

export async function action({ request, params }: Route.ActionArgs) {
  // Members only, before the body is read; the role the intent needs is checked below.
  await requireSiteRole(request, params.siteId, ALL_ROLES);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const owner = intent === "save" || intent === "rotate" || intent === "delete";
  const { siteId, user } = await requireSiteRole(request, params.siteId, owner ? ["owner"] : WRITERS);
  const sensor = await getSensor(siteId, params.sensorId);
  const site = await getSite(siteId);
  const who = { siteId, sensorId: sensor.id, actorId: user.id };

  if (intent === "place") {
    const placed = await placeFromForm(form, { ...who, timeZone: site.timeZone });
    return "placeError" in placed ? data(placed, { status: 400 }) : placed;
  }
  if (intent === "unplace") {
    await removeSensorFromSpot({ ...who, at: new Date() });
    return { placed: false };
  }
  if (PLACEMENT_EDITS.has(intent)) {
    const submission = parseWithZod(form, { schema: placementEditSchema });
    if (submission.status !== "success") return data({ editError: "Choose a time and a spot." }, { status: 400 });
    const edit = submission.value;
    const at = "at" in edit && edit.at ? parseLocalDateTime(edit.at, site.timeZone) : null;
    try {
      if (edit.intent === "move-start") {
        if (edit.start !== "first" && !at) return data({ editError: "Enter when it got there." }, { status: 400 });
        await movePlacementStart({
          ...who,
          placementId: edit.placementId,
          fromAt: edit.start === "first" ? "first" : at!,
        });
      } else if (edit.intent === "split") {
        if (!at) return data({ editError: "Enter when it was moved." }, { status: 400 });
        await splitPlacement({ ...who, placementId: edit.placementId, at, spotId: edit.spotId });
      } else {
        const end = (ms: number | undefined) => (ms === undefined ? null : new Date(ms));
        await assignUnplaced({ ...who, gap: { from: end(edit.gapFrom), to: end(edit.gapTo) }, spotId: edit.spotId });
      }
    } catch (err) {
      if (err instanceof PlacementError) return data({ editError: err.message }, { status: 400 });
      throw err;
    }
    return { edited: true };
  }
  if (intent === "save") {
    const submission = parseWithZod(form, { schema: calibrationSchema });
    if (submission.status !== "success") return data({ result: submission.reply() }, { status: 400 });
    const { name, ...offsets } = submission.value;
    const calibration = Object.fromEntries(Object.entries(offsets).filter(([, v]) => v != null && v !== 0));
    await saveSensor({ ...who, name, calibration });
    return { saved: true };
  }
  if (intent === "rotate") {
    const secret = await rotateSensorSecret(who);
    return redirect(`/sites/${siteId}/sensors/${sensor.id}?new=1#secret=${secret}`);
  }
  if (intent === "delete") {
    if (form.get("confirm") !== sensor.name)
      return data({ deleteError: `Type “${sensor.name}” to delete it.` }, { status: 400 });
    await deleteSensor({ ...who, name: sensor.name });
    return redirect(`/sites/${siteId}/sensors`);
  }
  throw data("Unknown action", { status: 400 });
}

export default function SensorPage({ loaderData, actionData }: Route.ComponentProps) {
  const { sensor, spots, history, unplaced, site, role, connect } = loaderData;
  const secret = useSecretFromFragment();
  const now = useNow(loaderData.now);
  const navigation = useNavigation();
  const current = history.find((p) => p.toAt === null);
  const status = useFetcher<{
    lastSeenAt: string | null;
    battery: number | null;
    latest: { measuredAt: string; temperature: number | null; humidity: number | null } | null;
  }>();
  const [firstSeenLive, setFirstSeenLive] = useState(false);
  const lastSeenAt = status.data?.lastSeenAt ?? sensor.lastSeenAt;
  const { load } = status;
  const seen = Boolean(lastSeenAt);

  useEffect(() => {
    const poll = () => {
      if (document.visibilityState === "visible") load(`/api/sites/${site.id}/sensors/${sensor.id}/status`);
    };
    const t = setInterval(poll, seen ? 15000 : 3000);
    return () => clearInterval(t);
  }, [site.id, sensor.id, seen, load]);

  // Latched while rendering (React's pattern for state that follows a change), so the notice stays
  // after a revalidation brings the first reading into the loader's data too.
  if (!firstSeenLive && !sensor.lastSeenAt && status.data?.lastSeenAt) setFirstSeenLive(true);

  const shownSecret = secret ?? "YOUR-SENSOR-SECRET";
  const topic = `nichewise/sensors/${sensor.id}/reading`;
  const example = `{"time":"2026-12-01T21:00:00Z","temperature":18.4,"humidity":56}`;
  const mosquitto =
    `mosquitto_pub -h ${connect.host} -p ${connect.port} -q 1 -u ` +
    `${sensor.id} -P '${shownSecret}' -t ${topic} -m ` +
    `'{"temperature":18.4,"humidity":56}'`;
  const curl =
    `curl -X POST ${connect.httpUrl} -H 'Authorization: Bearer ` +
    `${sensor.id}.${shownSecret}' -H 'Content-Type: ` +
    `application/json' -d '{"readings":[${example}]}'`;

  return (
    <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_22rem]">
      <div className="space-y-6">
        <section className="card">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <h2 className="h2">{sensor.name}</h2>
            <p className="text-sm text-muted">
              Sensor id {sensor.id} · reports {sensor.channels.join(", ")}
            </p>
          </div>
          <div aria-live="polite" className="mt-4">
            {firstSeenLive ? (
              <p
                className="rounded-[0.2rem] border border-l-4 border-good/30 border-l-good bg-card px-3 py-2 font-medium text-good"
                data-testid="first-reading"
              >
                First reading received — the sensor is connected.
                {status.data?.latest?.temperature != null ? ` ${status.data.latest.temperature.toFixed(1)} °C` : ""}
                {status.data?.latest?.humidity != null ? `, ${Math.round(status.data.latest.humidity)} % RH` : ""}
              </p>
            ) : lastSeenAt ? (
              <p className="text-sm">
                Last heard {timeAgo(lastSeenAt, now)} ({formatInZone(lastSeenAt, site.timeZone)})
                {(status.data?.battery ?? sensor.battery) != null
                  ? ` · battery ${Math.round((status.data?.battery ?? sensor.battery)!)} %`
                  : ""}
              </p>
            ) : (
              <p className="rounded-[0.2rem] bg-paper px-3 py-2 text-sm text-muted" data-testid="waiting">
                Waiting for the first reading… this page notices it without a reload.
              </p>
            )}
          </div>
        </section>

        {role === "owner" ? (
          <section className="card space-y-4">
            <h2 className="h2">Connect it</h2>
            {secret ? (
              <div className="caution">
                <p className="text-sm font-semibold">The sensor's secret — shown this once:</p>
                <code className="mt-1 block text-base break-all" data-testid="secret">
                  {secret}
                </code>
                <p className="mt-1 text-sm text-muted">
                  Copy it into the sensor now. It is stored only as a hash; if you lose it, make a new one below.
                </p>
              </div>
            ) : (
              <p className="text-sm text-muted">
                The secret was shown when the sensor was added. Lost it? Make a new one at the bottom of this page.
              </p>
            )}
            <dl className="grid grid-cols-[8rem_1fr] gap-x-3 gap-y-1 text-sm">
              <dt className="text-muted">MQTT broker</dt>
              <dd>
                {connect.host}:{connect.port} (WebSocket {connect.wsPort})
              </dd>
              <dt className="text-muted">User name</dt>
              <dd>
                <code>{sensor.id}</code>
              </dd>
              <dt className="text-muted">Password</dt>
              <dd>the secret</dd>
              <dt className="text-muted">Topic</dt>
              <dd>
                <code className="break-all">{topic}</code>
              </dd>
              <dt className="text-muted">QoS</dt>
              <dd>1 (the broker acknowledges only once the reading is stored)</dd>
            </dl>
            <p className="text-sm">
              Payload: a JSON object with any of <code>temperature</code> (°C, or °F with <code>"unit":"F"</code>),{" "}
              <code>humidity</code> (%), <code>lux</code>, <code>battery</code> (%) and an optional <code>time</code>{" "}
              (ISO 8601 with a zone, or epoch seconds). Firmwares that publish plain numbers can use{" "}
              <code>nichewise/sensors/{sensor.id}/temperature</code> (or <code>/humidity</code>, <code>/lux</code>,{" "}
              <code>/battery</code>).
            </p>
            <CopyBlock label="Try it from a computer (mosquitto_pub)" text={mosquitto} testId="mosquitto" />
            <CopyBlock label="Or over HTTP" text={curl} testId="curl" />
          </section>
        ) : null}

        {role !== "mentor" ? (
          <section className="card space-y-4">
            <h2 className="h2">{current ? "Move it" : "Place it"}</h2>
            <PlacingTips />
            <PlaceSensorForm
              spots={spots.filter((s) => s.id !== current?.spotId).map((s) => ({ id: s.id, name: s.name }))}
              timeZone={site.timeZone}
              error={actionData && "placeError" in actionData ? actionData.placeError : undefined}
              busy={navigation.state !== "idle"}
              allowFirst={history.length === 0}
            />
            {current ? (
              <Form method="post">
                <input type="hidden" name="intent" value="unplace" />
                <button className="btn-quiet">Take it out of {current.spotName}</button>
              </Form>
            ) : null}
          </section>
        ) : null}
      </div>

      <aside className="space-y-6">
        <section className="card scroll-mt-4" id="placements">
          <h2 className="h2 mb-3">Where it has been</h2>
          <PlacementEditor
            rows={history}
            unplaced={unplaced}
            spots={spots.map((s) => ({ id: s.id, name: s.name }))}
            timeZone={site.timeZone}
            canEdit={role !== "mentor"}
            error={actionData && "editError" in actionData ? actionData.editError : undefined}
            busy={navigation.state !== "idle"}
          />
        </section>
        {role === "owner" ? (
          <>
            <section className="card">
              <h2 className="h2 mb-3">Name and calibration</h2>
              <Form method="post" className="space-y-3">
                <input type="hidden" name="intent" value="save" />
                <div>
                  <label className="label" htmlFor="name">
                    Name
                  </label>
                  <input id="name" name="name" className="field" defaultValue={sensor.name} required />
                </div>
                <p className="hint">
                  Offsets are added to what the sensor reports (raw readings stay as received). Check humidity against a
                  salt test: a sealed bag with damp table salt reads about 75 % RH.
                </p>
                {(["temperature", "humidity", "lux"] as const).map((c) => (
                  <div key={c}>
                    <label className="label" htmlFor={`cal-${c}`}>
                      {c === "temperature"
                        ? "Temperature offset (°C)"
                        : c === "humidity"
                          ? "Humidity offset (% RH)"
                          : "Light offset (lux)"}
                    </label>
                    <input
                      id={`cal-${c}`}
                      name={c}
                      className="field"
                      inputMode="decimal"
                      defaultValue={sensor.calibration[c] ?? ""}
                    />
                  </div>
                ))}
                {actionData && "result" in actionData && actionData.result?.error ? (
                  <p className="error">{Object.values(actionData.result.error).flat().join(" ")}</p>
                ) : null}
                <button className="btn-quiet">Save</button>
              </Form>
            </section>
            <section className="card space-y-4">
              <Form method="post">
                <input type="hidden" name="intent" value="rotate" />
                <button className="btn-quiet w-full">Make a new secret</button>
                <p className="hint">The old secret stops working at once and its connection is closed.</p>
              </Form>
              <Form method="post" className="space-y-2">
                <input type="hidden" name="intent" value="delete" />
                <label className="label" htmlFor="confirm">
                  Type “{sensor.name}” to delete it and its readings
                </label>
                <input id="confirm" name="confirm" className="field" autoComplete="off" />
                {actionData && "deleteError" in actionData ? <p className="error">{actionData.deleteError}</p> : null}
                <button className="btn-danger w-full">Delete sensor</button>
              </Form>
            </section>
          </>
        ) : null}
      </aside>
    </div>
  );
}
