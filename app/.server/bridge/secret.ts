// Secrets kept at rest (a home broker's password): AES-256-GCM (NIST SP 800-38D) with a random
// 96-bit nonce per value, under a key the server keeps outside the database, so a copy of the
// database (a backup, a dump) does not give away the password. The key comes from NW_SECRET_KEY or,
// when that is unset, from a key file made once (mode 0600) beside the embedded database's
// directory: `<parent of NW_PG_DATA>/secret.key`, `.data/secret.key` by default. Losing the key
// loses only the stored passwords: the bridge page says so and asks for the password again.
//
// Stored form: "v1:" + base64(nonce ‖ tag ‖ ciphertext). The associated data binds a value to its
// row ("bridge:<site id>"), so a value copied into another site's row does not open. A value
// without the prefix is a plain one from before; it is still read, and sealed at the next start or save.
import { createCipheriv, createDecipheriv, randomBytes } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { env } from "~/.server/env";

const PREFIX = "v1:";
const NONCE = 12;
const TAG = 16;

export class SecretError extends Error {}

export const isSealed = (stored: string) => stored.startsWith(PREFIX);

export function sealWith(key: Buffer, plain: string, aad: string): string {
  const nonce = randomBytes(NONCE);
  const cipher = createCipheriv("aes-256-gcm", key, nonce);
  cipher.setAAD(Buffer.from(aad));
  const body = Buffer.concat([cipher.update(plain, "utf8"), cipher.final()]);
  return PREFIX + Buffer.concat([nonce, cipher.getAuthTag(), body]).toString("base64");
}

export function openWith(key: Buffer, stored: string, aad: string): string {
  if (!isSealed(stored)) return stored;
  const raw = Buffer.from(stored.slice(PREFIX.length), "base64");
  if (raw.length < NONCE + TAG) throw new SecretError("The stored password is damaged. Type it again and save.");
  try {
    const decipher = createDecipheriv("aes-256-gcm", key, raw.subarray(0, NONCE));
    decipher.setAAD(Buffer.from(aad));
    decipher.setAuthTag(raw.subarray(NONCE, NONCE + TAG));
    return Buffer.concat([decipher.update(raw.subarray(NONCE + TAG)), decipher.final()]).toString("utf8");
  } catch {
    throw new SecretError(
      "The stored password cannot be read with this server's key (NW_SECRET_KEY or the key file changed since it was saved). Type the password again and save.",
    );
  }
}

/** Where the key file lives when NW_SECRET_KEY is unset. */
export const keyFilePath = () => path.join(path.dirname(path.resolve(env().NW_PG_DATA)), "secret.key");

function readKeyFile(file: string): Buffer {
  const hex = readFileSync(file, "utf8").trim();
  if (!/^[0-9a-f]{64}$/.test(hex))
    throw new Error(
      `${file} does not hold a 256-bit key (64 hex digits); move it away to make a new one (stored broker passwords must then be typed again)`,
    );
  return Buffer.from(hex, "hex");
}

let cached: Buffer | undefined;

/** The server's key: NW_SECRET_KEY, else the key file (made on first use, never overwritten). */
export function secretKey(): Buffer {
  if (cached) return cached;
  const given = env().NW_SECRET_KEY;
  if (given) return (cached = Buffer.from(given, /^[0-9a-fA-F]{64}$/.test(given) ? "hex" : "base64"));
  const file = keyFilePath();
  try {
    return (cached = readKeyFile(file));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "ENOENT") throw err;
  }
  mkdirSync(path.dirname(file), { recursive: true, mode: 0o700 });
  try {
    // "wx": made once; a second process starting at the same moment reads the first one's key.
    writeFileSync(file, randomBytes(32).toString("hex") + "\n", { mode: 0o600, flag: "wx" });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
  }
  return (cached = readKeyFile(file));
}

const bridgeAad = (siteId: number) => `bridge:${siteId}`;
export const sealBridgePassword = (siteId: number, plain: string) => sealWith(secretKey(), plain, bridgeAad(siteId));
export const openBridgePassword = (siteId: number, stored: string) => openWith(secretKey(), stored, bridgeAad(siteId));
