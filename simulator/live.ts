// Live mode: one real MQTT client per demo sensor, publishing QoS 1 readings through the broker as
// the simulated clock passes each sample instant. With `coldFrontAt`, the bench sensor plays a
// compressed cold front instead (its scenario clock runs `frontSpeed` times faster than the wall
// clock, while each reading carries the real time), so the alert path can be watched in a minute.
import { readFileSync } from "node:fs";
import mqtt, { type MqttClient } from "mqtt";
import { coldFrontScenario, generate, type Scenario, type SimSpot } from "./model";
import { DEMO_HOUSEHOLD, type DemoSensorCredentials } from "./demo";

export const CREDENTIALS_FILE = process.env.NW_DEMO_CREDENTIALS ?? ".data/demo-sensors.json";

export type LiveSensor = {
  sensorId: number;
  secret: string;
  spot: SimSpot;
  seed: number;
  scenario?: Scenario;
  timeScale?: { origin: number; speed: number };
};

export async function startLiveSimulator(opts: {
  mqttUrl: string;
  intervalS: number;
  speed?: number;
  coldFrontAt?: Date | null;
  frontSpeed?: number;
  /** The weather every sensor plays: the one the weather service (fake) serves, with its forecast front. */
  scenario?: Scenario;
  credentialsFile?: string;
  log?: (s: string) => void;
}) {
  const creds = JSON.parse(readFileSync(opts.credentialsFile ?? CREDENTIALS_FILE, "utf8")) as DemoSensorCredentials;
  const sensors: LiveSensor[] = creds.map((c) => {
    const spot = DEMO_HOUSEHOLD.spots[c.spotIndex];
    const live: LiveSensor = { sensorId: c.sensorId, secret: c.secret, spot: spot.sim, seed: spot.sensor.seed };
    if (opts.coldFrontAt && spot.sim.kind === "outdoor") {
      const speed = opts.frontSpeed ?? 60;
      const origin = Date.now();
      // In scenario time the front starts one simulated hour after `coldFrontAt` in wall time.
      live.scenario = coldFrontScenario(new Date(origin + (opts.coldFrontAt.getTime() - origin) * speed + 3_600_000));
      live.timeScale = { origin, speed };
    }
    return live;
  });
  const runners = sensors.map((s) => runSensor(s, opts));
  opts.log?.(`Simulator: ${sensors.length} live sensors publishing every ${opts.intervalS} s`);
  return {
    stop: async () => {
      await Promise.all(runners.map((r) => r.stop()));
    },
  };
}

function runSensor(sensor: LiveSensor, opts: { mqttUrl: string; intervalS: number; scenario?: Scenario }) {
  const client: MqttClient = mqtt.connect(opts.mqttUrl, {
    username: String(sensor.sensorId),
    password: sensor.secret,
    clientId: `nichewise-sim-${sensor.sensorId}`,
    protocolVersion: 4,
    reconnectPeriod: 2000,
    connectTimeout: 10_000,
  });
  client.on("error", () => {});
  const topic = `nichewise/sensors/${sensor.sensorId}/reading`;
  const intervalMs = opts.intervalS * 1000;
  let last = Date.now();
  const scenario = sensor.scenario ?? opts.scenario ?? DEMO_HOUSEHOLD.scenario;
  const tick = () => {
    const now = Date.now();
    const scale = sensor.timeScale;
    if (scale) {
      // A compressed front: sample the scenario at scaled time, stamp with the real time.
      const simNow = scale.origin + (now - scale.origin) * scale.speed;
      const simLast = scale.origin + (last - scale.origin) * scale.speed;
      const step = Math.max(1000, intervalMs / 6) * scale.speed;
      for (const r of generate(DEMO_HOUSEHOLD.site, sensor.spot, scenario, {
        from: new Date(simLast),
        to: new Date(simNow),
        intervalMs: step,
        sensorSeed: sensor.seed,
      })) {
        const real = scale.origin + (r.measuredAt.getTime() - scale.origin) / scale.speed;
        publish({ ...r, measuredAt: new Date(Math.min(real, now)) });
      }
    } else {
      for (const r of generate(DEMO_HOUSEHOLD.site, sensor.spot, scenario, {
        from: new Date(last),
        to: new Date(now),
        intervalMs,
        sensorSeed: sensor.seed,
        artifacts: true,
        installedAt: new Date(now - 200 * 86_400_000),
      })) {
        publish(r);
      }
    }
    last = now;
  };
  const publish = (r: { measuredAt: Date; temperature: number; humidity: number; lux?: number; battery: number }) => {
    const payload = JSON.stringify({
      time: r.measuredAt.toISOString(),
      temperature: r.temperature,
      humidity: r.humidity,
      ...(r.lux !== undefined ? { lux: r.lux } : {}),
      battery: Math.round(r.battery),
    });
    client.publish(topic, payload, { qos: 1 }, () => {});
  };
  const timer = setInterval(tick, sensor.timeScale ? 1000 : Math.min(intervalMs, 5000));
  return {
    stop: () =>
      new Promise<void>((resolve) => {
        clearInterval(timer);
        client.end(false, {}, () => resolve());
      }),
  };
}
