// Each preset read with payloads written from the project's public documentation (page named
// beside each test); values and units checked by hand against the page.
import { describe, expect, it } from "vitest";
import { decodePayload, normaliseMac, parseDiscoveryConfig, payloadTime, recognise, type Mapping } from "./presets";

const b = (s: string) => new TextEncoder().encode(s);
const ctx = { now: new Date("2026-06-01T12:00:00Z"), timeZone: "Europe/London" };
const decode = (payload: string, mapping: Mapping, c = ctx) => decodePayload(b(payload), mapping, c);

describe("Zigbee2MQTT device JSON", () => {
  // https://www.zigbee2mqtt.io/guide/usage/mqtt_topics_and_messages.html ("zigbee2mqtt/FRIENDLY_NAME",
  // the WSDCGQ01LM example) and a device page's Exposes (temperature °C, humidity %, battery %, linkquality).
  it("reads temperature, humidity and battery, and ignores linkquality", () => {
    const r = decode('{"temperature":27.34,"humidity":44.72,"battery":86,"linkquality":97,"voltage":2995}', {
      preset: "zigbee2mqtt",
    });
    expect(r).toEqual({
      ok: true,
      items: [{ device: null, values: { temperature: 27.34, humidity: 44.72, lux: null, battery: 86, at: null } }],
    });
  });
  it("takes last_seen (ISO 8601 with offset) as the time", () => {
    const r = decode('{"temperature":21,"last_seen":"2026-06-01T13:59:00+02:00"}', { preset: "zigbee2mqtt" });
    expect(r.ok && r.items[0].values.at?.toISOString()).toBe("2026-06-01T11:59:00.000Z");
  });
  it("refuses a message with no climate value, and a non-numeric temperature, with the reason", () => {
    expect(decode('{"action":"single","linkquality":80}', { preset: "zigbee2mqtt" })).toMatchObject({
      ok: false,
      reason: expect.stringContaining("no temperature"),
    });
    expect(decode('{"temperature":"warm"}', { preset: "zigbee2mqtt" })).toEqual({
      ok: false,
      reason: "temperature: not a number",
    });
  });
});

describe("Tasmota tele/<topic>/SENSOR", () => {
  // https://tasmota.github.io/docs/AM2301/ ("Sensor sends a tele/%topic%/SENSOR JSON response").
  it("reads the nested sensor object; Time is the device's local time, read in the site's zone", () => {
    const r = decode('{"Time":"2026-06-01T12:30:00","AM2301":{"Temperature":24.6,"Humidity":58.2},"TempUnit":"C"}', {
      preset: "tasmota",
      device: "AM2301",
    });
    expect(r.ok && r.items).toEqual([
      {
        device: "AM2301",
        values: { temperature: 24.6, humidity: 58.2, lux: null, battery: null, at: new Date("2026-06-01T11:30:00Z") },
      },
    ]);
  });
  it('converts "TempUnit":"F" to °C', () => {
    const r = decode('{"Time":"2026-06-01T12:30:00","SI7021":{"Temperature":75.2,"Humidity":40},"TempUnit":"F"}', {
      preset: "tasmota",
    });
    expect(r.ok && r.items[0].values.temperature).toBeCloseTo(24, 6);
  });
  it("gives one item per attached sensor", () => {
    const r = decode(
      '{"Time":"2026-06-01T12:30:00","DS18B20-1":{"Id":"01131B4D2EAA","Temperature":18.1},"BH1750":{"Illuminance":523},"TempUnit":"C"}',
      { preset: "tasmota" },
    );
    expect(r.ok && r.items.map((i) => [i.device, i.values.temperature, i.values.lux])).toEqual([
      ["DS18B20-1", 18.1, null],
      ["BH1750", null, 523],
    ]);
  });
  it("refuses an unknown TempUnit", () => {
    expect(decode('{"AM2301":{"Temperature":24},"TempUnit":"K"}', { preset: "tasmota" })).toMatchObject({
      ok: false,
      reason: expect.stringContaining("TempUnit"),
    });
  });
});

describe("ESPHome per-entity state topics", () => {
  // https://esphome.io/components/mqtt.html (state topic <topic_prefix>/<component>/<name>/state;
  // the value is sent as plain text).
  it("reads a plain number as the chosen channel, °F converted", () => {
    expect(decode("21.5", { preset: "esphome", channel: "temperature", unit: "C" })).toMatchObject({
      ok: true,
      items: [{ values: { temperature: 21.5 } }],
    });
    const f = decode("70.7", { preset: "esphome", channel: "temperature", unit: "F" });
    expect(f.ok && f.items[0].values.temperature).toBeCloseTo(21.5, 6);
    expect(decode("55", { preset: "esphome", channel: "humidity" })).toMatchObject({
      ok: true,
      items: [{ values: { humidity: 55, temperature: null } }],
    });
  });
  it("refuses nan (no value yet) and text, with the reason", () => {
    expect(decode("nan", { preset: "esphome", channel: "temperature" })).toMatchObject({
      ok: false,
      reason: expect.stringContaining("NaN"),
    });
    expect(decode("ON", { preset: "esphome", channel: "temperature" })).toMatchObject({
      ok: false,
      reason: expect.stringContaining("not a number"),
    });
  });
});

describe("Shelly Gen2+ NotifyStatus", () => {
  // https://shelly-api-docs.shelly.cloud/gen2/General/Notifications (NotifyStatus: params.ts is Unix
  // time in UTC; component keys "type:id"); the Temperature and Humidity components' status (tC, tF, rh).
  it("reads temperature:0 and humidity:0 with params.ts as the time", () => {
    const r = decode(
      '{"src":"shellyhtg3-84fce63bc2a8","dst":"shellyhtg3-84fce63bc2a8/events","method":"NotifyStatus",' +
        '"params":{"ts":1780315200.52,"temperature:0":{"id":0,"tC":19.8,"tF":67.6}}}',
      { preset: "shelly" },
    );
    expect(r.ok && r.items).toEqual([
      {
        device: "0",
        values: { temperature: 19.8, humidity: null, lux: null, battery: null, at: new Date(1780315200520) },
      },
    ]);
    const h = decode('{"method":"NotifyStatus","params":{"ts":1780315201,"humidity:0":{"id":0,"rh":42.2}}}', {
      preset: "shelly",
    });
    expect(h.ok && h.items[0].values.humidity).toBe(42.2);
  });
  it("uses tF when tC is missing, and reads the battery of devicepower:0", () => {
    const r = decode(
      '{"method":"NotifyFullStatus","params":{"ts":1780315200,"temperature:0":{"id":0,"tF":68},"devicepower:0":{"id":0,"battery":{"V":5.9,"percent":87}}}}',
      { preset: "shelly" },
    );
    expect(r.ok && r.items[0].values.temperature).toBeCloseTo(20, 6);
    expect(r.ok && r.items[0].values.battery).toBe(87);
  });
  it("refuses other notifications", () => {
    expect(decode('{"method":"NotifyEvent","params":{"ts":1,"events":[]}}', { preset: "shelly" })).toMatchObject({
      ok: false,
    });
  });
});

describe("OpenMQTTGateway / Theengs BLE JSON", () => {
  // https://docs.openmqttgateway.com/use/ble.html (BTtoMQTT messages: "id" the MAC, decoded tempc,
  // tempf, hum, batt) and https://decoder.theengs.io/devices/LYWSD03MMC_ATC.html (memory: field names).
  it("reads one advertisement with its MAC as the device", () => {
    const r = decode(
      '{"id":"A4:C1:38:1E:5B:6F","name":"ATC_1E5B6F","rssi":-67,"brand":"Xiaomi","model":"LYWSD03MMC",' +
        '"model_id":"LYWSD03MMC_ATC","tempc":22.6,"tempf":72.68,"hum":53,"batt":89,"volt":2.96}',
      { preset: "ble-gateway" },
    );
    expect(r.ok && r.items).toEqual([
      { device: "A4:C1:38:1E:5B:6F", values: { temperature: 22.6, humidity: 53, lux: null, battery: 89, at: null } },
    ]);
  });
  it("converts tempf when tempc is absent; an advertisement with no values gives no item", () => {
    const r = decode('{"id":"a4c1381e5b6f","tempf":71.6,"hum":50}', { preset: "ble-gateway" });
    expect(r.ok && r.items[0].device).toBe("A4:C1:38:1E:5B:6F");
    expect(r.ok && r.items[0].values.temperature).toBeCloseTo(22, 6);
    expect(
      decode('{"id":"45:F6:8A:76:86:C5","rssi":-55,"txpower":12,"distance":0.49}', { preset: "ble-gateway" }),
    ).toEqual({ ok: true, items: [] });
  });
  it("normalises addresses", () => {
    expect(normaliseMac("a4-c1-38-1e-5b-6f")).toBe("A4:C1:38:1E:5B:6F");
    expect(normaliseMac("not a mac")).toBeNull();
  });
});

describe("Home Assistant MQTT discovery config", () => {
  // https://www.home-assistant.io/integrations/mqtt/#mqtt-discovery and
  // https://www.home-assistant.io/integrations/sensor.mqtt/ (state_topic, device_class,
  // unit_of_measurement, value_template; the abbreviations stat_t, unit_of_meas, dev_cla, val_tpl; "~").
  it("reads state topic, channel, unit and a simple value_json path", () => {
    const hint = parseDiscoveryConfig(
      b(
        '{"device_class":"temperature","state_topic":"tele/tasmota_ble/ATC264902","name":"ATC ' +
          'Temperature","unit_of_measurement":"°F","value_template":"{{ ' +
          'value_json.Temperature }}"}',
      ),
    );
    expect(hint).toEqual({
      stateTopic: "tele/tasmota_ble/ATC264902",
      channel: "temperature",
      unit: "F",
      path: "Temperature",
    });
    const short = parseDiscoveryConfig(
      b('{"~":"greenhouse/node1","stat_t":"~/sensor/rh/state","dev_cla":"humidity","unit_of_meas":"%"}'),
    );
    expect(short).toEqual({
      stateTopic: "greenhouse/node1/sensor/rh/state",
      channel: "humidity",
      unit: null,
      path: null,
    });
  });
  it("leaves a template it cannot read to the grower", () => {
    expect(
      parseDiscoveryConfig(
        b('{"state_topic":"x/y","device_class":"temperature","value_template":"{{ value_json.t | float * 2 }}"}'),
      )?.path,
    ).toBeNull();
  });
  it("makes a °F ESPHome entity read in °C through its hint", () => {
    const hint = parseDiscoveryConfig(
      b('{"dev_cla":"temperature","unit_of_meas":"°F","stat_t":"node/sensor/porch_temperature/state"}'),
    );
    const [r] = recognise("node/sensor/porch_temperature/state", b("68"), ctx, hint);
    expect(r.mapping).toMatchObject({ preset: "esphome", channel: "temperature", unit: "F" });
    expect(r.items[0].values.temperature).toBeCloseTo(20, 6);
  });
});

describe("custom mapping", () => {
  // Common practice: a JSON path per value, a unit for the temperature and a time field.
  it("reads dotted paths, converts °F, takes the time field", () => {
    const r = decode('{"env":{"t":68,"rh":[51.5]},"ts":1780315200}', {
      preset: "custom",
      unit: "F",
      paths: { temperature: "env.t", humidity: "env.rh.0", time: "ts" },
    });
    expect(r.ok && r.items[0].values).toEqual({
      temperature: 20,
      humidity: 51.5,
      lux: null,
      battery: null,
      at: new Date(1780315200000),
    });
  });
  it("says which field is wrong", () => {
    expect(decode('{"env":{"t":"x"}}', { preset: "custom", paths: { temperature: "env.t" } })).toEqual({
      ok: false,
      reason: "env.t: not a number",
    });
  });
});

describe("recognising payloads while listening", () => {
  it("suggests the right preset for each format, one suggestion per device in a shared topic", () => {
    const at = (topic: string, payload: string) =>
      recognise(topic, b(payload), ctx).map((r) => [r.mapping.preset, r.mapping.device ?? null]);
    expect(at("zigbee2mqtt/bench", '{"temperature":20,"humidity":60,"linkquality":90}')).toEqual([
      ["zigbee2mqtt", null],
    ]);
    expect(
      at(
        "tele/shelf/SENSOR",
        '{"Time":"2026-06-01T12:00:00","AM2301":{"Temperature":20,"Humidity":60},"TempUnit":"C"}',
      ),
    ).toEqual([["tasmota", "AM2301"]]);
    expect(
      at("shellyhtg3-1/events/rpc", '{"method":"NotifyStatus","params":{"ts":1780315200,"temperature:0":{"tC":20}}}'),
    ).toEqual([["shelly", "0"]]);
    expect(at("home/gw/BTtoMQTT", '{"id":"A4:C1:38:00:00:01","tempc":20,"hum":60}')).toEqual([
      ["ble-gateway", "A4:C1:38:00:00:01"],
    ]);
    expect(at("node/sensor/shelf_humidity/state", "61")).toEqual([["esphome", null]]);
    expect(at("zigbee2mqtt/bridge/state", '{"state":"online"}')).toEqual([]);
  });
});

describe("payload times", () => {
  // The repeated hour (UK clocks go back 2026-10-25 02:00 BST → 01:00 GMT): a zone-less 01:30 is
  // read as the occurrence nearer the receive time.
  it("reads a wall time in the repeated hour as the occurrence nearer the receive time", () => {
    const first = payloadTime("2026-10-25T01:30:00", {
      now: new Date("2026-10-25T00:31:00Z"),
      timeZone: "Europe/London",
    });
    const second = payloadTime("2026-10-25T01:30:00", {
      now: new Date("2026-10-25T01:31:00Z"),
      timeZone: "Europe/London",
    });
    expect(first).toEqual(new Date("2026-10-25T00:30:00Z"));
    expect(second).toEqual(new Date("2026-10-25T01:30:00Z"));
    expect(payloadTime("2026-02-30T10:00:00", ctx)).toBe("bad");
  });
});
