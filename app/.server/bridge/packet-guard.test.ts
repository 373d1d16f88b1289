// The guard must follow packets exactly as mqtt-packet frames them (MQTT 3.1.1 §2.2.3), however
// the stream is cut into chunks, and stop at the first packet announced over the limit.
import mqttPacket from "mqtt-packet";
import { describe, expect, it } from "vitest";
import { PacketSizeGuard } from "./packet-guard";

const publish = (bytes: number) =>
  mqttPacket.generate({
    cmd: "publish",
    topic: "a/b",
    payload: Buffer.alloc(bytes, 120),
    qos: 1,
    messageId: 7,
    retain: false,
    dup: false,
  });

describe("PacketSizeGuard", () => {
  it("lets packets under the limit through, fed a byte at a time or all at once", () => {
    const stream = Buffer.concat([publish(10), publish(200), publish(4000), mqttPacket.generate({ cmd: "pingresp" })]);
    const whole = new PacketSizeGuard(5000);
    expect(whole.feed(stream)).toBe(true);
    const bytewise = new PacketSizeGuard(5000);
    for (const byte of stream) expect(bytewise.feed(Uint8Array.of(byte))).toBe(true);
  });
  it("refuses the first packet announced over the limit, before its body arrives", () => {
    const guard = new PacketSizeGuard(5000);
    expect(guard.feed(publish(100))).toBe(true);
    const big = publish(300_000);
    // Only the fixed header: the body has not been read.
    expect(guard.feed(big.subarray(0, 5))).toBe(false);
    expect(guard.tooBig).toBeGreaterThan(300_000);
    expect(guard.feed(publish(10))).toBe(false);
  });
});
