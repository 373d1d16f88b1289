// Reads the fixed headers of the MQTT packets a broker sends (MQTT 3.1.1 §2.2: one type byte, then
// the remaining length in 1–4 bytes of 7 bits each) alongside the client's own parser, so that a
// packet announced over the limit closes the connection before MQTT.js buffers its body: its parser
// has no size limit and would collect whatever a broker announces (MQTT 5 lets us tell the broker a
// maximum packet size; MQTT 3.1.1 does not).
export class PacketSizeGuard {
  private state: "type" | "length" | "body" = "type";
  private length = 0;
  private multiplier = 1;
  private lengthBytes = 0;
  private remaining = 0;
  /** The announced length that broke the limit, once one has. */
  tooBig: number | null = null;

  constructor(readonly maxBytes: number) {}

  /** False once a packet over the limit (or a malformed length) has been announced. */
  feed(chunk: Uint8Array): boolean {
    if (this.tooBig !== null) return false;
    let i = 0;
    while (i < chunk.length) {
      if (this.state === "body") {
        const n = Math.min(this.remaining, chunk.length - i);
        this.remaining -= n;
        i += n;
        if (this.remaining === 0) this.state = "type";
        continue;
      }
      const byte = chunk[i++];
      if (this.state === "type") {
        this.state = "length";
        this.length = 0;
        this.multiplier = 1;
        this.lengthBytes = 0;
        continue;
      }
      this.length += (byte & 0x7f) * this.multiplier;
      this.multiplier *= 128;
      this.lengthBytes++;
      if (byte & 0x80) {
        if (this.lengthBytes >= 4) return this.refuse(Number.POSITIVE_INFINITY);
        continue;
      }
      if (this.length > this.maxBytes) return this.refuse(this.length);
      this.remaining = this.length;
      this.state = this.remaining > 0 ? "body" : "type";
    }
    return true;
  }

  private refuse(length: number) {
    this.tooBig = length;
    return false;
  }
}
