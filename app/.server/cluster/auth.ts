// The engine asks Nichewise who may connect and publish (RabbitMQ's HTTP auth backend,
// rabbitmq_auth_backend_http): sensor secrets are stored as SHA-256 hashes (DEVELOPERS.md), which
// RabbitMQ's own user store can't check, so every node posts the sensor's id and secret here and
// the same check as the embedded broker's (verifySensorSecret, with its cache) answers. A sensor may
// publish only under its own topic, as on the embedded broker; the engine's own users (the ingest
// workers) are in its internal store, which it asks first.
//
// The plugin posts a form and reads "allow" or "deny" from the body. The URLs carry a shared key so
// that nobody but the engine can use this as an oracle for sensor secrets.
import { timingSafeEqual } from "node:crypto";
import express from "express";
import { isSensorId } from "~/domain/ingest/payload";
import { CHANNEL_TOPICS } from "~/domain/ingest/payload";
import { verifySensorSecret } from "~/.server/ingest/sensor-cache";

/** The exchange RabbitMQ's MQTT plugin publishes to (its default, `mqtt.exchange`). */
export const MQTT_EXCHANGE = "amq.topic";
const CHANNELS = new Set<string>(["reading", ...CHANNEL_TOPICS]);

type Form = Record<string, string | undefined>;

const sensorOf = (username: string | undefined) => {
  const id = Number(username);
  return username && /^\d{1,10}$/.test(username) && isSensorId(id) ? id : null;
};

/** May this sensor use this routing key (MQTT topic with "/" as ".") for `permission`? */
export function topicAllowed(
  sensorId: number,
  permission: string | undefined,
  routingKey: string | undefined,
): boolean {
  if (!routingKey) return false;
  const parts = routingKey.split(".");
  if (parts.length !== 4 || parts[0] !== "nichewise" || parts[1] !== "sensors" || parts[2] !== String(sensorId))
    return false;
  if (permission === "write") return CHANNELS.has(parts[3]);
  // Subscribing to its own topics (a sensor hearing its own messages), never with a wildcard for the id.
  if (permission === "read") return parts[3] === "#" || CHANNELS.has(parts[3]);
  return false;
}

/** What a sensor may touch besides topics: write to the MQTT exchange; its own subscription queues. */
export function resourceAllowed(f: Form): boolean {
  if (f.vhost !== "/") return false;
  if (f.resource === "exchange")
    return f.name === MQTT_EXCHANGE && (f.permission === "write" || f.permission === "read");
  if (f.resource === "queue") return !!f.name?.startsWith("mqtt-subscription-");
  return false;
}

function keyMatches(given: unknown, key: string) {
  if (typeof given !== "string") return false;
  const a = Buffer.from(given);
  const b = Buffer.from(key);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** The four endpoints the plugin calls (user, vhost, resource, topic), under one path. */
export function engineAuthRouter(key: string): express.Router {
  const router = express.Router();
  // The plugin's forms are a few hundred bytes; a secret is at most 200 characters.
  router.use(express.urlencoded({ extended: false, limit: "4kb", parameterLimit: 20 }));
  router.use((req, res, next) =>
    keyMatches(req.query.key, key) ? next() : void res.status(403).type("text/plain").send("deny"),
  );
  const answer = (res: express.Response, ok: boolean) => void res.type("text/plain").send(ok ? "allow" : "deny");
  router.post("/user", (req, res) => {
    const f = req.body as Form;
    const id = sensorOf(f.username);
    if (!id || !f.password) return answer(res, false);
    verifySensorSecret(id, f.password).then(
      (info) => answer(res, info !== null),
      // The database is away: the engine refuses the CONNECT and the sensor retries, as on the embedded broker.
      () => void res.status(503).type("text/plain").send("deny"),
    );
  });
  router.post("/vhost", (req, res) => {
    const f = req.body as Form;
    answer(res, sensorOf(f.username) !== null && f.vhost === "/");
  });
  router.post("/resource", (req, res) => {
    const f = req.body as Form;
    answer(res, sensorOf(f.username) !== null && resourceAllowed(f));
  });
  router.post("/topic", (req, res) => {
    const f = req.body as Form;
    const id = sensorOf(f.username);
    answer(
      res,
      id !== null && f.vhost === "/" && f.name === MQTT_EXCHANGE && topicAllowed(id, f.permission, f.routing_key),
    );
  });
  return router;
}
