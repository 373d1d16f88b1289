import type { Client } from "aedes";
import { MAX_PAYLOAD_BYTES } from "~/domain/ingest/payload";

/**
 * Largest packets taken, by the length their fixed header announces (MQTT 3.1.1 §2.2.3), checked
 * before the body is read. A CONNECT holds a client id, the sensor id, a secret of at most 200
 * characters and perhaps a small will message. A PUBLISH holds a topic and a payload; payloads a
 * little over MAX_PAYLOAD_BYTES are still read, acknowledged and recorded with their reason.
 */
export const MAX_CONNECT_BYTES = 4 * 1024;
export const MAX_PUBLISH_BYTES = MAX_PAYLOAD_BYTES + 1024;
const MAX_OTHER_BYTES = 4 * 1024;
export const packetLimit = (cmd: string) =>
  cmd === "publish" ? MAX_PUBLISH_BYTES : cmd === "connect" ? MAX_CONNECT_BYTES : MAX_OTHER_BYTES;
/** A connection that has not sent a complete CONNECT within this is closed (aedes' connectTimeout). */
export const CONNECT_TIMEOUT_MS = 10_000;

type PacketParser = {
  packet: { cmd: string; length: number };
  _list: { length: number; consume: (n: number) => void };
  _parseLength: () => boolean;
  _emitError: (err: Error) => void;
};

/**
 * Makes a client's packet parser refuse a packet whose announced length is over its limit, before
 * the parser buffers the body: mqtt-packet's Parser has no such setting and would otherwise collect
 * an announced 200 MB. The parser's error closes the connection (aedes' client error path).
 */
export function limitPacketSizes(client: Client, tooBig: (client: Client, cmd: string, length: number) => void) {
  const parser = (client as unknown as { _parser: PacketParser })._parser;
  const parseLength = parser._parseLength;
  parser._parseLength = function (this: PacketParser) {
    if (!parseLength.call(this)) return false;
    const { cmd, length } = this.packet;
    if (length <= packetLimit(cmd)) return true;
    this._list.consume(this._list.length);
    tooBig(client, cmd, length);
    this._emitError(new Error(`${cmd} packet of ${length} bytes is over the limit`));
    return false;
  };
}
