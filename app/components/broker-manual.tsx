// Attaching a topic listening did not recognise: its format, or the grower's own mapping. Folded
// away, since most growers attach what listening heard.
import { Form } from "react-router";
import { BRIDGE_CHANNELS, PRESET_LABELS, PRESETS } from "~/domain/payloads/presets";
import { SensorChoice, type SensorOption, type SpotOption } from "./broker-sensor-choice";

type Errors = Partial<Record<string, string>>;

export function BrokerManual(props: { errors: Errors; topic: string; sensors: SensorOption[]; spots: SpotOption[] }) {
  const { errors } = props;
  const open = Object.keys(errors).length > 0;
  return (
    <details className="fold" open={open}>
      <summary>Attach a topic by hand</summary>
      <div className="space-y-3">
        <p className="hint">
          For a topic listening did not recognise: choose its format, or give your own mapping — the dotted path of each
          value in the JSON (like
          <code> env.temp</code>), the temperature unit, and the path of a time field if the message has one (else the
          time it arrives is used).
        </p>
        <Form method="post" className="grid gap-3 sm:grid-cols-2">
          <div>
            <label className="label" htmlFor="topic">
              Topic
            </label>
            <input className="field w-full" id="topic" name="topic" required defaultValue={props.topic} />
            {errors.topic ? <p className="error">{errors.topic}</p> : null}
          </div>
          <div>
            <label className="label" htmlFor="device">
              Device in a shared topic (optional)
            </label>
            <input className="field w-full" id="device" name="device" aria-describedby="device-hint" />
            <p id="device-hint" className="hint">
              A BLE address (A4:C1:38:…) or a Tasmota sensor's name (AM2301).
            </p>
          </div>
          <div>
            <label className="label" htmlFor="preset">
              Format
            </label>
            <select className="field w-full" id="preset" name="preset" defaultValue="custom">
              {PRESETS.map((p) => (
                <option key={p} value={p}>
                  {PRESET_LABELS[p]}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label className="label" htmlFor="manualSensor">
              Sensor
            </label>
            <SensorChoice id="manualSensor" sensors={props.sensors} spots={props.spots} />
            {errors.sensorId ? <p className="error">{errors.sensorId}</p> : null}
          </div>
          <div>
            <label className="label" htmlFor="channel">
              A plain number is
            </label>
            <select className="field w-full" id="channel" name="channel" defaultValue="">
              <option value="">(the message is JSON)</option>
              {BRIDGE_CHANNELS.map((c) => (
                <option key={c} value={c}>
                  {c === "lux" ? "light (lux)" : c}
                </option>
              ))}
            </select>
            {errors.channel ? <p className="error">{errors.channel}</p> : null}
          </div>
          <div>
            <label className="label" htmlFor="unitOfTemperature">
              Temperature is sent in
            </label>
            <select className="field w-full" id="unitOfTemperature" name="unitOfTemperature" defaultValue="C">
              <option value="C">°C</option>
              <option value="F">°F</option>
            </select>
          </div>
          {(["temperature", "humidity", "lux", "battery", "time"] as const).map((c) => (
            <div key={c}>
              <label className="label" htmlFor={`path_${c}`}>
                Path of {c === "lux" ? "light (lux)" : c}
              </label>
              <input className="field w-full" id={`path_${c}`} name={`path_${c}`} />
            </div>
          ))}
          {errors.paths || errors.mapping ? (
            <p className="error sm:col-span-2" role="alert">
              {errors.paths ?? errors.mapping}
            </p>
          ) : null}
          <div className="sm:col-span-2">
            <button className="btn" name="intent" value="attach">
              Attach this topic
            </button>
          </div>
        </Form>
      </div>
    </details>
  );
}
