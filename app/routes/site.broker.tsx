import { data, Form, useFetcher } from "react-router";
import { useEffect } from "react";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { readForm, toId } from "~/.server/ids";
import { getSite } from "~/.server/sites";
import { createSensor, listSensors, PlacementError } from "~/.server/sensors.server";
import { getSpot, listSpots } from "~/.server/spots";
import { bridgeState, reloadBridge } from "~/.server/bridge/registry";
import { foundTopics, ListenRefused, listeningFor, startListening } from "~/.server/bridge/discovery";
import { attachTopic, detachTopic, getBridge, LinkError, listLinks, saveBridge, viewOf } from "~/.server/bridge/store";
import { PRESET_LABELS, sensorChannelsFor, sensorNameFor } from "~/domain/payloads/presets";
import { bridgeSettingsSchema, listenSchema, mappingSchema, topicSchema } from "~/domain/payloads/schema";
import type { TempUnit } from "~/domain/units";
import { useNow } from "~/components/use-now";
import { BrokerListen } from "~/components/broker-listen";
import { BrokerManual } from "~/components/broker-manual";
import { NEW_SENSOR } from "~/components/broker-sensor-choice";
import { BrokerSettings } from "~/components/broker-settings";
import { BrokerState } from "~/components/broker-state";
import type { Route } from "./+types/site.broker";

export const meta: Route.MetaFunction = () => [{ title: "Home broker · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [site, config, sensors, spots] = await Promise.all([
    getSite(siteId),
    getBridge(siteId),
    listSensors(siteId),
    listSpots(siteId),
  ]);
  const links = config ? await listLinks(config.id) : [];
  const l = role === "owner" ? listeningFor(siteId) : null;
  const names = new Map(sensors.map((s) => [s.id, s.name]));
  return {
    now: Date.now(),
    site,
    role,
    unit: user.temperatureUnit as TempUnit,
    // Only the owner sees where the broker is and as whom Nichewise signs in; never the password.
    bridge: config ? (role === "owner" ? viewOf(config) : { enabled: config.enabled, passwordError: null }) : null,
    state: bridgeState(siteId),
    links: links.map((k) => ({
      id: k.id,
      topic: k.topic,
      device: k.device,
      preset: k.mapping.preset,
      sensorName: names.get(k.sensorId) ?? "?",
    })),
    sensors: sensors.map((s) => ({ id: s.id, name: s.name, spotName: s.spotName })),
    spots: spots.map((s) => ({ id: s.id, name: s.name })),
    listening: l
      ? {
          prefix: l.prefix,
          status: l.status,
          note: l.note,
          endsAt: l.endsAt,
          // A topic already attached says to which sensor, rather than offering to attach it again.
          found: foundTopics(l, site.timeZone)
            .slice(0, 200)
            .map((f) => {
              const link = links.find((k) => k.topic === f.topic && k.device === (f.mapping?.device ?? ""));
              return { ...f, attachedTo: link ? (names.get(link.sensorId) ?? "?") : null };
            }),
        }
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
    // An existing sensor's id, or "new:<spot id>" ("new:": not placed) for one made in this step.
    const choice = text("sensorId") ?? "";
    const newIn = choice.startsWith(NEW_SENSOR) ? choice.slice(NEW_SENSOR.length) : null;
    const spotId = newIn ? toId(newIn) : null;
    const sensorId = newIn === null ? toId(choice) : null;
    let raw: unknown;
    const json = text("mapping");
    if (json !== undefined) {
      if (json.length > 2000)
        return data({ intent, errors: { mapping: "That mapping is too long." } }, { status: 400 });
      try {
        raw = JSON.parse(json);
      } catch {
        return data(
          { intent, errors: { mapping: "That mapping could not be read: listen again and retry." } },
          { status: 400 },
        );
      }
    } else {
      const path = (c: string) => text(`path_${c}`);
      raw = {
        preset: text("preset"),
        device: text("device"),
        channel: text("channel") || undefined,
        unit: text("unitOfTemperature") || undefined,
        paths: {
          temperature: path("temperature"),
          humidity: path("humidity"),
          lux: path("lux"),
          battery: path("battery"),
          time: path("time"),
        },
      };
    }
    const mapping = mappingSchema.safeParse(raw);
    const errors: FieldErrors = {};
    if (!topic.success) errors.topic = topic.error.issues[0].message;
    const chosen = sensorId !== null || (newIn !== null && (newIn === "" || spotId !== null));
    if (!chosen) errors.sensorId = "Choose the sensor these readings belong to.";
    if (!mapping.success) Object.assign(errors, issues(mapping.error));
    if (!topic.success || !chosen || !mapping.success)
      return data({ intent, errors, topic: text("topic") ?? "" }, { status: 400 });
    let created: string | null = null;
    let placedIn: string | null = null;
    try {
      let id = sensorId;
      if (id === null) {
        if (!(await getBridge(siteId))) throw new LinkError("Connect the home broker first.");
        created = sensorNameFor(topic.data, mapping.data.device);
        if (spotId) placedIn = (await getSpot(siteId, spotId).catch(() => null))?.name ?? null;
        const channels = sensorChannelsFor(mapping.data);
        id = (
          await createSensor({
            siteId,
            name: created,
            channels,
            spotId: spotId ?? undefined,
            since: "first",
            actorId: user.id,
          })
        ).id;
      }
      await attachTopic({ siteId, actorId: user.id, sensorId: id, topic: topic.data, mapping: mapping.data });
    } catch (err) {
      if (err instanceof LinkError || err instanceof PlacementError)
        return data({ intent, errors: { form: err.message } }, { status: 400 });
      throw err;
    }
    await reloadBridge(siteId, { restart: false });
    return {
      intent,
      attached: topic.data + (mapping.data.device ? ` · ${mapping.data.device}` : ""),
      created,
      placedIn,
    };
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

export default function SiteBroker({ loaderData, actionData }: Route.ComponentProps) {
  const { site, role, unit } = loaderData;
  const now = useNow(loaderData.now);
  const live = useFetcher<typeof loader>();
  const { load } = live;
  const current = live.data ?? loaderData;
  const listening = current.listening;
  // The state refreshes itself; faster while listening, so topics show up as they are heard.
  useEffect(() => {
    const every = listening?.status === "listening" ? 2_000 : 15_000;
    const t = setInterval(() => {
      if (document.visibilityState === "visible") void load(`/sites/${site.id}/broker`);
    }, every);
    return () => clearInterval(t);
  }, [site.id, listening?.status, load]);
  const bridge = current.bridge && "url" in current.bridge ? current.bridge : null;
  const errors: FieldErrors = (actionData && "errors" in actionData ? actionData.errors : null) ?? {};
  const errorFor = (intent: string) => (actionData?.intent === intent ? errors : {});
  const owner = role === "owner";
  const saved = !!actionData && "saved" in actionData;
  const settings = <BrokerSettings bridge={bridge} errors={errorFor("save")} saved={saved} />;

  return (
    <div className="space-y-8">
      <section className="space-y-3" aria-labelledby="bridge-state">
        <h2 id="bridge-state" className="text-xl font-semibold">
          Sensors you already have
        </h2>
        <p className="text-muted">
          If your sensors already report to an MQTT broker at home (through a Zigbee or Bluetooth gateway, or their own
          Wi-Fi firmware), Nichewise can sign in to that broker and take their readings as they come, with no new
          firmware.
        </p>
        {!current.bridge ? (
          <p className="card">
            No home broker is connected to {site.name}.
            {owner
              ? " First give its address and the user Nichewise signs in as; then listen for your sensors' topics."
              : " The site's owner can connect one."}
          </p>
        ) : (
          <BrokerState
            state={current.state}
            enabled={current.bridge.enabled}
            passwordError={current.bridge.passwordError}
            attached={current.links.length}
            now={now}
          />
        )}
      </section>

      {owner && !current.bridge ? (
        <section className="card space-y-3" aria-labelledby="connection">
          <h2 id="connection" className="h2">
            Connect your broker
          </h2>
          {settings}
        </section>
      ) : null}

      {current.bridge ? (
        <section className="space-y-3" aria-labelledby="attached">
          <h2 id="attached" className="h2">
            Attached topics
          </h2>
          {current.links.length === 0 ? (
            <p className="text-muted">
              Nothing attached yet.{owner ? " Listen below, then attach what you recognise." : ""}
            </p>
          ) : (
            <ul className="card divide-y divide-line p-0">
              {current.links.map((k) => (
                <li key={k.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-2.5">
                  <span>
                    <code className="break-all">{k.topic}</code>
                    {k.device ? <span className="text-muted"> · device {k.device}</span> : null} →{" "}
                    <strong>{k.sensorName}</strong>{" "}
                    <span className="text-sm text-muted">{PRESET_LABELS[k.preset]}</span>
                  </span>
                  {owner ? (
                    <Form method="post">
                      <input type="hidden" name="linkId" value={k.id} />
                      <button
                        className="btn-quiet"
                        name="intent"
                        value="detach"
                        aria-label={`Detach ${k.topic}${k.device ? ` ${k.device}` : ""}`}
                      >
                        Detach
                      </button>
                    </Form>
                  ) : null}
                </li>
              ))}
            </ul>
          )}
          {actionData && "attached" in actionData ? (
            <p className="text-sm text-good" role="status">
              Attached {actionData.attached}
              {actionData.created
                ? actionData.placedIn
                  ? ` to the new sensor “${actionData.created}” in ${actionData.placedIn}, from its first reading (rename it on the Sensors tab)`
                  : ` to the new sensor “${actionData.created}”, not placed yet: place it on the Sensors tab so its readings count for a spot`
                : ""}
              .
            </p>
          ) : null}
          {errorFor("attach").form ? (
            <p className="error" role="alert">
              {errorFor("attach").form}
            </p>
          ) : null}
        </section>
      ) : null}

      {owner && current.bridge ? (
        <>
          <BrokerListen
            listening={listening}
            error={errorFor("listen").prefix}
            sensors={current.sensors}
            spots={current.spots}
            unit={unit}
            timeZone={site.timeZone}
          />
          <BrokerManual
            errors={errorFor("attach")}
            topic={actionData && "topic" in actionData ? String(actionData.topic ?? "") : ""}
            sensors={current.sensors}
            spots={current.spots}
          />
          <details className="fold" open={saved || actionData?.intent === "save" || !!bridge?.passwordError}>
            <summary>Broker settings</summary>
            <div>{settings}</div>
          </details>
        </>
      ) : null}
    </div>
  );
}
