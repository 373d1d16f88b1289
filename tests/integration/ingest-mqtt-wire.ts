// A bare MQTT 3.1.1 client on a raw socket, for what MQTT.js will not do on request: leave a PUBACK
// unread and resend the same packet id with the DUP flag. Encodings follow OASIS MQTT 3.1.1
// §2.2.3 (remaining length), §3.1 (CONNECT), §3.2 (CONNACK), §3.3 (PUBLISH) and §3.4 (PUBACK).
import { connect, type Socket } from "node:net";

/** The remaining-length field of MQTT 3.1.1 §2.2.3. */
export function remainingLength(n: number): Buffer {
  const out: number[] = [];
  do {
    let byte = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) byte |= 0x80;
    out.push(byte);
  } while (n > 0);
  return Buffer.from(out);
}

const str = (s: string) => {
  const b = Buffer.from(s, "utf8");
  const len = Buffer.alloc(2);
  len.writeUInt16BE(b.length);
  return Buffer.concat([len, b]);
};

const packet = (firstByte: number, body: Buffer) =>
  Buffer.concat([Buffer.from([firstByte]), remainingLength(body.length), body]);

export function connectPacket(clientId: string, username: string, password: string) {
  // Protocol name "MQTT", level 4, flags: user name + password + clean session, keep-alive 60 s.
  const header = Buffer.concat([str("MQTT"), Buffer.from([4, 0xc2, 0, 60])]);
  return packet(0x10, Buffer.concat([header, str(clientId), str(username), str(password)]));
}

export function publishPacket(topic: string, payload: string, packetId: number, dup: boolean) {
  const id = Buffer.alloc(2);
  id.writeUInt16BE(packetId);
  return packet(0x30 | (dup ? 0x08 : 0) | (1 << 1), Buffer.concat([str(topic), id, Buffer.from(payload, "utf8")]));
}

export type RawClient = {
  socket: Socket;
  /** Resolves with the next PUBACK's packet id. */
  nextPuback: () => Promise<number>;
  send: (b: Buffer) => void;
  destroy: () => void;
};

/** Connects and waits for CONNACK; rejects with the return code when refused. */
export function rawConnect(port: number, clientId: string, username: string, password: string): Promise<RawClient> {
  return new Promise((resolve, reject) => {
    const socket = connect(port, "127.0.0.1");
    let buf = Buffer.alloc(0);
    const pubacks: number[] = [];
    const waiters: ((id: number) => void)[] = [];
    let connacked = false;
    socket.on("error", reject);
    socket.on("data", (chunk) => {
      buf = Buffer.concat([buf, chunk]);
      // CONNACK and PUBACK both have a remaining length of 2 (four bytes in all).
      while (buf.length >= 4) {
        const type = buf[0] >> 4;
        const body = buf.subarray(2, 4);
        buf = buf.subarray(4);
        if (type === 2 && !connacked) {
          connacked = true;
          if (body[1] !== 0) reject(new Error(`CONNACK return code ${body[1]}`));
          else
            resolve({
              socket,
              send: (b) => socket.write(b),
              destroy: () => socket.destroy(),
              nextPuback: () =>
                pubacks.length > 0 ? Promise.resolve(pubacks.shift()!) : new Promise<number>((r) => waiters.push(r)),
            });
        } else if (type === 4) {
          const id = body.readUInt16BE(0);
          const w = waiters.shift();
          if (w) w(id);
          else pubacks.push(id);
        }
      }
    });
    socket.on("connect", () => socket.write(connectPacket(clientId, username, password)));
  });
}
