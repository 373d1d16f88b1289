// Listening on the grower's broker for a minute: the topics heard, what each would store, and the
// sensor to attach it to (an existing one, or a new one in the same step).
import { Form } from "react-router";
import { PRESET_LABELS, sensorNameFor, type Mapping, type Values } from "~/domain/payloads/presets";
import { formatTemp, type TempUnit } from "~/domain/units";
import { formatInZone } from "~/lib/date-words";
import { SensorChoice, type SensorOption, type SpotOption } from "./broker-sensor-choice";

export type HeardTopic = {
  topic: string;
  device: string | null;
  count: number;
  mapping: Mapping | null;
  preview: Values[];
  note?: string | null;
  /** The sensor it is attached to already, or null. */
  attachedTo: string | null;
};
export type Listening = { prefix: string; status: string; note: string | null; found: HeardTopic[] };

function preview(v: Values, unit: TempUnit, timeZone: string) {
  const parts = [
    v.temperature !== null ? formatTemp(v.temperature, unit) : null,
    v.humidity !== null ? `${v.humidity.toFixed(0)} % RH` : null,
    v.lux !== null ? `${Math.round(v.lux)} lx` : null,
    v.battery !== null ? `battery ${Math.round(v.battery)} %` : null,
  ].filter(Boolean);
  return `${parts.join(" · ")} — ${v.at ? `measured ${formatInZone(v.at, timeZone)}` : "at the time it arrives"}`;
}

export function BrokerListen(props: {
  listening: Listening | null;
  error?: string;
  sensors: SensorOption[];
  spots: SpotOption[];
  unit: TempUnit;
  timeZone: string;
}) {
  const { listening } = props;
  const where = `“${listening?.prefix || "everything"}”`;
  return (
    <section className="card space-y-3" aria-labelledby="listen">
      <h2 id="listen" className="h2">
        Listen for topics
      </h2>
      <p className="hint">
        For up to a minute Nichewise notes what the broker publishes under a prefix (and any Home Assistant discovery
        messages, which tell units), and suggests how to read each topic. Nothing is stored while listening.
      </p>
      <Form method="post" className="flex flex-wrap items-end gap-3">
        <div>
          <label className="label" htmlFor="prefix">
            Prefix
          </label>
          <input
            className="field w-64"
            id="prefix"
            name="prefix"
            aria-describedby="prefix-hint"
            defaultValue={listening?.prefix ?? ""}
          />
        </div>
        <button className="btn" name="intent" value="listen">
          Listen for a minute
        </button>
        {listening?.status === "listening" ? (
          <button className="btn-quiet" name="intent" value="stop-listening">
            Stop
          </button>
        ) : null}
      </Form>
      <p id="prefix-hint" className="hint">
        The start of your sensors' topics, often <code>zigbee2mqtt</code> or <code>tele</code>; empty hears everything.
      </p>
      {props.error ? (
        <p className="error" role="alert">
          {props.error}
        </p>
      ) : null}
      {listening ? (
        <div className="space-y-2" data-testid="heard">
          <p className="text-sm text-muted" role="status">
            {listening.status === "listening" ? `Listening under ${where}…` : `Listened under ${where}.`}{" "}
            {listening.note ?? ""} {listening.found.length} topics heard.
          </p>
          <ul className="divide-y divide-line rounded-2xl border border-line" aria-label="Topics heard">
            {listening.found.map((f) => (
              <Heard key={`${f.topic}|${f.device ?? ""}|${f.mapping?.preset ?? ""}`} heard={f} {...props} />
            ))}
          </ul>
        </div>
      ) : null}
    </section>
  );
}

function Heard(props: {
  heard: HeardTopic;
  sensors: SensorOption[];
  spots: SpotOption[];
  unit: TempUnit;
  timeZone: string;
}) {
  const f = props.heard;
  const label = `${f.topic}${f.device ? ` ${f.device}` : ""}`;
  return (
    <li className="space-y-1 px-4 py-2.5" aria-label={label}>
      <p>
        <code className="break-all">{f.topic}</code>
        {f.device ? <span className="text-muted"> · device {f.device}</span> : null}{" "}
        <span className="text-sm text-muted">
          {f.count} messages{f.mapping ? ` · ${PRESET_LABELS[f.mapping.preset]}` : ""}
        </span>
      </p>
      {f.attachedTo ? (
        <p className="text-sm">
          Attached to <strong>{f.attachedTo}</strong>.
        </p>
      ) : f.mapping ? (
        <>
          <p className="text-sm">
            Would store: {f.preview.map((v) => preview(v, props.unit, props.timeZone)).join("; ")}
          </p>
          <Form method="post" className="flex flex-wrap items-center gap-2">
            <input type="hidden" name="topic" value={f.topic} />
            <input type="hidden" name="mapping" value={JSON.stringify(f.mapping)} />
            <SensorChoice
              label={`Sensor for ${label}`}
              sensors={props.sensors}
              spots={props.spots}
              newName={sensorNameFor(f.topic, f.mapping.device)}
            />
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
}
