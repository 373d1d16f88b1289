import { data, Form, useFetcher } from "react-router";
import { useEffect } from "react";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { readForm, toId } from "~/.server/ids";
import { getSite } from "~/.server/sites";
import { listSensors } from "~/.server/sensors.server";
import { bridgeState, reloadBridge } from "~/.server/bridge/runtime";
import { foundTopics, ListenRefused, listeningFor, startListening } from "~/.server/bridge/discovery";
import { attachTopic, detachTopic, getBridge, LinkError, listLinks, saveBridge, viewOf } from "~/.server/bridge/store";
import { BRIDGE_CHANNELS, PRESET_LABELS, PRESETS, type Mapping, type Values } from "~/domain/payloads/presets";
import { bridgeSettingsSchema, listenSchema, mappingSchema, topicSchema } from "~/domain/payloads/schema";
import { formatInZone, timeAgo } from "~/lib/time";
import { formatTemp, type TempUnit } from "~/domain/units";
import { useNow } from "~/components/use-now";
import type { Route } from "./+types/site.broker";

export const meta: Route.MetaFunction = () => [{ title: "Home broker · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [site, config, sensors] = await Promise.all([getSite(siteId), getBridge(siteId), listSensors(siteId)]);
  const links = config ? await listLinks(config.id) : [];
  const l = role === "owner" ? listeningFor(siteId) : null;
  const names = new Map(sensors.map((s) => [s.id, s.name]));
  return {
    now: Date.now(),
    site,
    role,
    unit: user.temperatureUnit as TempUnit,
    // Only the owner sees where the broker is and as whom Nichewise signs in; never the password.
    bridge: config ? (role === "owner" ? viewOf(config) : { enabled: config.enabled }) : null,
    state: bridgeState(siteId),
    links: links.map((k) => ({ id: k.id, topic: k.topic, device: k.device, preset: k.mapping.preset, sensorName: names.get(k.sensorId) ?? "?" })),
    sensors: sensors.map((s) => ({ id: s.id, name: s.name, spotName: s.spotName })),
    listening: l
      ? { prefix: l.prefix, status: l.status, note: l.note, endsAt: l.endsAt, found: foundTopics(l, site.timeZone).slice(0, 200) }
      : null,
  };
}

type FieldErrors = Partial<Record<string, string>>;
const issues = (error: { issues: { path: PropertyKey[]; message: string }[] }): FieldErrors =>
  Object.fromEntries(error.issues.map((i) => [String(i.path[0] ?? "form"), i.message]));

export async function action({ request, params }: Route.ActionArgs) {
  // Owner only, before the body is read: the bridge's settings hold a password.
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const form = await readForm(request);
  const intent = form.get("intent");
  const text = (k: string) => {
    const v = form.get(k);
    return typeof v === "string" ? v : undefined;
  };

  if (intent === "save") {
    const parsed = bridgeSettingsSchema.safeParse({
      url: text("url"),
      username: text("username"),
      password: text("password"),
      clearPassword: text("clearPassword"),
      protocolVersion: text("protocolVersion") ?? "4",
      caCert: text("caCert"),
      enabled: text("enabled"),
    });
    if (!parsed.success) return data({ intent, errors: issues(parsed.error) }, { status: 400 });
    const p = parsed.data;
    await saveBridge({ siteId, actorId: user.id, ...p, clearPassword: p.clearPassword === "on" });
    await reloadBridge(siteId, { restart: true });
    return { intent, saved: true };
  }

  if (intent === "listen") {
    const config = await getBridge(siteId);
    if (!config) return data({ intent, errors: { prefix: "Save the broker's address first." } }, { status: 400 });
    if (config.passwordError) return data({ intent, errors: { prefix: config.passwordError } }, { status: 400 });
    const parsed = listenSchema.safeParse({ prefix: text("prefix") ?? "" });
    if (!parsed.success) return data({ intent, errors: issues(parsed.error) }, { status: 400 });
    try {
      startListening(config, parsed.data.prefix);
    } catch (err) {
      if (err instanceof ListenRefused) return data({ intent, errors: { prefix: err.message } }, { status: 503 });
      throw err;
    }
    return { intent, listening: true };
  }

  if (intent === "stop-listening") {
    listeningFor(siteId)?.stop();
    return { intent };
  }

  if (intent === "attach") {
    const topic = topicSchema.safeParse(text("topic") ?? "");
    const sensorId = toId(form.get("sensorId"));
    let raw: unknown;
    const json = text("mapping");
    if (json !== undefined) {
      if (json.length > 2000) return data({ intent, errors: { mapping: "That mapping is too long." } }, { status: 400 });
      try {
        raw = JSON.parse(json);
      } catch {
        return data({ intent, errors: { mapping: "That mapping could not be read: listen again and retry." } }, { status: 400 });
      }
    } else {
      const path = (c: string) => text(`path_${c}`);
      raw = {
        preset: text("preset"),
        device: text("device"),
        channel: text("channel") || undefined,
        unit: text("unitOfTemperature") || undefined,
        paths: { temperature: path("temperature"), humidity: path("humidity"), lux: path("lux"), battery: path("battery"), time: path("time") },
      };
    }
    const mapping = mappingSchema.safeParse(raw);
    const errors: FieldErrors = {};
    if (!topic.success) errors.topic = topic.error.issues[0].message;
    if (!sensorId) errors.sensorId = "Choose the sensor these readings belong to.";
    if (!mapping.success) Object.assign(errors, issues(mapping.error));
    if (!topic.success || !sensorId || !mapping.success) return data({ intent, errors, topic: text("topic") ?? "" }, { status: 400 });
    try {
      await attachTopic({ siteId, actorId: user.id, sensorId, topic: topic.data, mapping: mapping.data });
    } catch (err) {
      if (err instanceof LinkError) return data({ intent, errors: { form: err.message } }, { status: 400 });
      throw err;
    }
    await reloadBridge(siteId, { restart: false });
    return { intent, attached: topic.data + (mapping.data.device ? ` · ${mapping.data.device}` : "") };
  }

  if (intent === "detach") {
    const linkId = toId(form.get("linkId"));
    if (!linkId) throw data("That choice is not valid; reload the page and try again.", { status: 400 });
    await detachTopic({ siteId, actorId: user.id, linkId });
    await reloadBridge(siteId, { restart: false });
    return { intent, detached: true };
  }
  throw data("Unknown action", { status: 400 });
}

const STATUS_WORDS = { connecting: "Connecting…", connected: "Connected", offline: "Not connected — trying again", stopped: "Stopped" } as const;

function preview(v: Values, unit: TempUnit, timeZone: string) {
  const parts = [
    v.temperature !== null ? formatTemp(v.temperature, unit) : null,
    v.humidity !== null ? `${v.humidity.toFixed(0)} % RH` : null,
    v.lux !== null ? `${Math.round(v.lux)} lx` : null,
    v.battery !== null ? `battery ${Math.round(v.battery)} %` : null,
  ].filter(Boolean);
  return `${parts.join(" · ")} — ${v.at ? `measured ${formatInZone(v.at, timeZone)}` : "at the time it arrives"}`;
}

export default function SiteBroker({ loaderData, actionData }: Route.ComponentProps) {
  const { site, role, unit } = loaderData;
  const now = useNow(loaderData.now);
  const live = useFetcher<typeof loader>();
  const current = live.data ?? loaderData;
  const listening = current.listening;
  // The state refreshes itself; faster while listening, so topics show up as they are heard.
  useEffect(() => {
    const every = listening?.status === "listening" ? 2_000 : 15_000;
    const t = setInterval(() => {
      if (document.visibilityState === "visible") live.load(`/sites/${site.id}/broker`);
    }, every);
    return () => clearInterval(t);
  }, [site.id, listening?.status]);
  const state = current.state;
  const bridge = current.bridge && "url" in current.bridge ? current.bridge : null;
  const errors: FieldErrors = (actionData && "errors" in actionData ? actionData.errors : null) ?? {};
  const errorFor = (intent: string) => (actionData?.intent === intent ? errors : {});
  const owner = role === "owner";
  const sensorOptions = current.sensors.map((s) => (
    <option key={s.id} value={s.id}>
      {s.name}
      {s.spotName ? ` (in ${s.spotName})` : " (not placed)"}
    </option>
  ));

  return (
    <div className="space-y-8">
      <section className="space-y-3" aria-labelledby="bridge-state">
        <h2 id="bridge-state" className="text-xl font-semibold">Sensors you already have</h2>
        <p className="text-muted">
          If your sensors already report to an MQTT broker at home (through a Zigbee or Bluetooth gateway, or their own Wi-Fi firmware), Nichewise can
          sign in to that broker and take their readings as they come, with no new firmware.
        </p>
        {!current.bridge ? (
          <p className="card">No home broker is connected to {site.name}.{owner ? " Give its address below." : " The site's owner can connect one."}</p>
        ) : (
          <div className="card space-y-2" data-testid="bridge-state">
            <p className="font-semibold">
              {state ? STATUS_WORDS[state.status] : current.bridge.enabled ? "Not running in this server yet" : "Switched off"}
              {state?.connectedSince ? <span className="font-normal text-muted"> · since {timeAgo(new Date(state.connectedSince), now)}</span> : null}
            </p>
            <p className="text-sm">
              Last message: {state?.lastMessageAt ? timeAgo(new Date(state.lastMessageAt), now) : "none yet"}
              {state ? ` · ${state.counts.stored} readings stored, ${state.counts.rejected} refused (see each sensor's page for why)` : null}
              {state && state.counts.outsideSpot ? ` · ${state.counts.outsideSpot} fall outside any spot (place their sensor on its page)` : null}
              {state && state.counts.otherDevices ? ` · ${state.counts.otherDevices} messages from devices not attached` : null}
              {state && state.counts.heldBack ? ` · ${state.counts.heldBack} times a topic sent too fast and was slowed` : null}
              {state && state.counts.staleRetained ? ` · ${state.counts.staleRetained} old kept values skipped (they carry no time)` : null}
            </p>
            {state?.lastError ? (
              <p className="text-sm text-poor" role="status">
                Last problem ({timeAgo(new Date(state.lastError.at), now)}): {state.lastError.message}
              </p>
            ) : null}
          </div>
        )}
      </section>

      <section className="space-y-3" aria-labelledby="attached">
        <h2 id="attached" className="h2">Attached topics</h2>
        {current.links.length === 0 ? (
          <p className="text-muted">Nothing attached yet.{owner ? " Listen to the broker below, then attach what you recognise." : ""}</p>
        ) : (
          <ul className="card divide-y divide-line p-0">
            {current.links.map((k) => (
              <li key={k.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-2.5">
                <span>
                  <code className="break-all">{k.topic}</code>
                  {k.device ? <span className="text-muted"> · device {k.device}</span> : null} → <strong>{k.sensorName}</strong>{" "}
                  <span className="text-sm text-muted">{PRESET_LABELS[k.preset]}</span>
                </span>
                {owner ? (
                  <Form method="post">
                    <input type="hidden" name="linkId" value={k.id} />
                    <button className="btn-quiet" name="intent" value="detach" aria-label={`Detach ${k.topic}${k.device ? ` ${k.device}` : ""}`}>
                      Detach
                    </button>
                  </Form>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {actionData && "attached" in actionData ? <p className="text-sm text-good" role="status">Attached {actionData.attached}.</p> : null}
        {errorFor("attach").form ? <p className="error" role="alert">{errorFor("attach").form}</p> : null}
      </section>

      {owner ? (
        <section className="card space-y-3" aria-labelledby="listen">
          <h2 id="listen" className="h2">Listen for topics</h2>
          <p className="hint">
            For up to a minute Nichewise notes what the broker publishes under a prefix (and any Home Assistant discovery messages, which tell units), and
            suggests how to read each topic. Nothing is stored while listening.
          </p>
          <Form method="post" className="flex flex-wrap items-end gap-3">
            <div>
              <label className="label" htmlFor="prefix">Prefix</label>
              <input className="field w-64" id="prefix" name="prefix" placeholder="zigbee2mqtt (empty: everything)" />
            </div>
            <button className="btn" name="intent" value="listen" disabled={!bridge}>
              Listen for a minute
            </button>
            {listening?.status === "listening" ? (
              <button className="btn-quiet" name="intent" value="stop-listening">Stop</button>
            ) : null}
          </Form>
          {errorFor("listen").prefix ? <p className="error" role="alert">{errorFor("listen").prefix}</p> : null}
          {listening ? (
            <div className="space-y-2" data-testid="heard">
              <p className="text-sm text-muted" role="status">
                {listening.status === "listening" ? `Listening under “${listening.prefix || "everything"}”…` : `Listened under “${listening.prefix || "everything"}”.`}{" "}
                {listening.note ?? ""} {listening.found.length} topics heard.
              </p>
              {current.sensors.length === 0 ? <p className="text-sm">Add a sensor for each device first (Sensors → Add a sensor); then attach its topic here.</p> : null}
              <ul className="divide-y divide-line rounded-2xl border border-line" aria-label="Topics heard">
                {listening.found.map((f) => {
                  const label = `${f.topic}${f.device ? ` ${f.device}` : ""}`;
                  return (
                    <li key={`${f.topic}|${f.device ?? ""}|${f.mapping?.preset ?? ""}`} className="space-y-1 px-4 py-2.5" aria-label={label}>
                      <p>
                        <code className="break-all">{f.topic}</code>
                        {f.device ? <span className="text-muted"> · device {f.device}</span> : null}{" "}
                        <span className="text-sm text-muted">
                          {f.count} messages{f.mapping ? ` · ${PRESET_LABELS[f.mapping.preset]}` : ""}
                        </span>
                      </p>
                      {f.mapping ? (
                        <>
                          <p className="text-sm">Would store: {f.preview.map((v) => preview(v, unit, site.timeZone)).join("; ")}</p>
                          <Form method="post" className="flex flex-wrap items-center gap-2">
                            <input type="hidden" name="topic" value={f.topic} />
                            <input type="hidden" name="mapping" value={JSON.stringify(f.mapping satisfies Mapping)} />
                            <select className="field w-64" name="sensorId" required defaultValue="" aria-label={`Sensor for ${label}`}>
                              <option value="" disabled>
                                Choose a sensor…
                              </option>
                              {sensorOptions}
                            </select>
                            <button className="btn" name="intent" value="attach" aria-label={`Attach ${label}`}>
                              Attach
                            </button>
                          </Form>
                        </>
                      ) : (
                        <p className="text-sm text-muted">{f.note}</p>
                      )}
                    </li>
                  );
                })}
              </ul>
            </div>
          ) : null}
        </section>
      ) : null}

      {owner ? (
        <section className="card space-y-3" aria-labelledby="own-mapping">
          <h2 id="own-mapping" className="h2">Attach a topic by hand</h2>
          <p className="hint">
            For a topic listening did not recognise: choose its format, or give your own mapping — the dotted path of each value in the JSON (like
            <code> env.temp</code>), the temperature unit, and the path of a time field if the message has one (else the time it arrives is used).
          </p>
          <Form method="post" className="grid gap-3 sm:grid-cols-2">
            <div>
              <label className="label" htmlFor="topic">Topic</label>
              <input className="field w-full" id="topic" name="topic" required defaultValue={actionData && "topic" in actionData ? String(actionData.topic ?? "") : ""} />
              {errorFor("attach").topic ? <p className="error">{errorFor("attach").topic}</p> : null}
            </div>
            <div>
              <label className="label" htmlFor="device">Device in a shared topic (optional)</label>
              <input className="field w-full" id="device" name="device" placeholder="A4:C1:38:1E:5B:6F or AM2301" />
            </div>
            <div>
              <label className="label" htmlFor="preset">Format</label>
              <select className="field w-full" id="preset" name="preset" defaultValue="custom">
                {PRESETS.map((p) => (
                  <option key={p} value={p}>{PRESET_LABELS[p]}</option>
                ))}
              </select>
            </div>
            <div>
              <label className="label" htmlFor="manualSensor">Sensor</label>
              <select className="field w-full" id="manualSensor" name="sensorId" required defaultValue="">
                <option value="" disabled>Choose a sensor…</option>
                {sensorOptions}
              </select>
              {errorFor("attach").sensorId ? <p className="error">{errorFor("attach").sensorId}</p> : null}
            </div>
            <div>
              <label className="label" htmlFor="channel">A plain number is</label>
              <select className="field w-full" id="channel" name="channel" defaultValue="">
                <option value="">(the message is JSON)</option>
                {BRIDGE_CHANNELS.map((c) => (
                  <option key={c} value={c}>{c === "lux" ? "light (lux)" : c}</option>
                ))}
              </select>
              {errorFor("attach").channel ? <p className="error">{errorFor("attach").channel}</p> : null}
            </div>
            <div>
              <label className="label" htmlFor="unitOfTemperature">Temperature is sent in</label>
              <select className="field w-full" id="unitOfTemperature" name="unitOfTemperature" defaultValue="C">
                <option value="C">°C</option>
                <option value="F">°F</option>
              </select>
            </div>
            {(["temperature", "humidity", "lux", "battery", "time"] as const).map((c) => (
              <div key={c}>
                <label className="label" htmlFor={`path_${c}`}>Path of {c === "lux" ? "light (lux)" : c}</label>
                <input className="field w-full" id={`path_${c}`} name={`path_${c}`} />
              </div>
            ))}
            {errorFor("attach").paths || errorFor("attach").mapping ? (
              <p className="error sm:col-span-2" role="alert">{errorFor("attach").paths ?? errorFor("attach").mapping}</p>
            ) : null}
            <div className="sm:col-span-2">
              <button className="btn" name="intent" value="attach" disabled={!bridge}>Attach this topic</button>
            </div>
          </Form>
        </section>
      ) : null}

      {owner ? (
        <section className="card space-y-3" aria-labelledby="connection">
          <h2 id="connection" className="h2">Your broker</h2>
          {/* Remounted after each save, so a typed password does not stay in the page. */}
          <Form key={String(bridge?.updatedAt ?? "new")} method="post" className="grid gap-3 sm:grid-cols-2" autoComplete="off">
            <div className="sm:col-span-2">
              <label className="label" htmlFor="url">Address</label>
              <input className="field w-full" id="url" name="url" required placeholder="mqtt://192.168.1.20:1883" defaultValue={bridge?.url ?? ""} />
              {errorFor("save").url ? <p className="error">{errorFor("save").url}</p> : null}
              <p className="hint">mqtts:// for TLS (port 8883 unless you give another).</p>
            </div>
            <div>
              <label className="label" htmlFor="username">User name</label>
              <input className="field w-full" id="username" name="username" defaultValue={bridge?.username ?? ""} />
            </div>
            <div>
              <label className="label" htmlFor="password">Password</label>
              <input className="field w-full" id="password" name="password" type="password" autoComplete="new-password" placeholder={bridge?.hasPassword ? "(kept — type to change)" : ""} />
              {bridge?.passwordError ? <p className="error" role="alert">{bridge.passwordError}</p> : null}
              {bridge?.hasPassword ? (
                <label className="mt-1 inline-flex items-center gap-2 text-sm">
                  <input type="checkbox" name="clearPassword" /> Remove the stored password
                </label>
              ) : null}
            </div>
            <div>
              <label className="label" htmlFor="protocolVersion">MQTT version</label>
              <select className="field w-full" id="protocolVersion" name="protocolVersion" defaultValue={String(bridge?.protocolVersion ?? 4)}>
                <option value="4">3.1.1</option>
                <option value="5">5</option>
              </select>
            </div>
            <div>
              <span className="label">Connection</span>
              <label className="inline-flex items-center gap-2">
                <input type="checkbox" name="enabled" defaultChecked={bridge?.enabled ?? true} /> Take readings from this broker
              </label>
            </div>
            <div className="sm:col-span-2">
              <label className="label" htmlFor="caCert">Your own CA certificate, for mqtts:// (optional, PEM)</label>
              <textarea className="field h-24 w-full font-mono text-xs" id="caCert" name="caCert" defaultValue={bridge?.caCert ?? ""} />
              {errorFor("save").caCert ? <p className="error">{errorFor("save").caCert}</p> : null}
            </div>
            <p className="hint sm:col-span-2">
              Give Nichewise a user of its own on the broker, allowed to read your sensors' topics. The password is kept so Nichewise can reconnect by
              itself, and is never shown again. A reading is confirmed to the broker only once it is stored, so nothing is lost while Nichewise restarts.
            </p>
            <div className="flex items-center gap-3 sm:col-span-2">
              <button className="btn" name="intent" value="save">Save and connect</button>
              {actionData && "saved" in actionData ? <span className="text-sm text-good">Saved</span> : null}
            </div>
          </Form>
        </section>
      ) : null}
    </div>
  );
}
