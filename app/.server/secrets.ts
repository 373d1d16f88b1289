import { verify } from "@node-rs/argon2";
import { sha256 } from "@oslojs/crypto/sha2";
import { constantTimeEqual } from "@oslojs/crypto/subtle";
import { encodeBase32LowerCaseNoPadding, encodeHexLowerCase } from "@oslojs/encoding";

/**
 * 160 random bits in lower-case base32, as the Lucia guide makes session tokens: sessions,
 * invitations and sensor secrets (which then type on a phone and fit firmware forms).
 */
export function randomToken() {
  const bytes = new Uint8Array(20);
  crypto.getRandomValues(bytes);
  return encodeBase32LowerCaseNoPadding(bytes);
}

/** A sensor's secret. */
export const newSensorSecret = randomToken;

/** The hex SHA-256 of a random token: what is stored of session tokens, invitations and sensor secrets. */
export const sha256Hex = (token: string) => encodeHexLowerCase(sha256(new TextEncoder().encode(token)));

const PREFIX = "sha256:";

/**
 * What the database keeps of a sensor's secret: its SHA-256, as the Lucia guide keeps a session
 * token's. A slow hash (argon2id, as for passwords) protects secrets people choose and can guess;
 * 160 random bits cannot be guessed either way, and a slow hash cost every sensor ~15 ms of CPU and
 * 19 MiB at each connect: 200 sensors reconnecting after a restart held ~45 MB at once.
 */
export const hashSensorSecret = (secret: string) => PREFIX + sha256Hex(secret);

/**
 * Whether `secret` matches the stored hash. Sensors made before the change have an argon2id hash;
 * `legacy` tells the caller to store the new form after a match.
 */
export async function checkSensorSecret(stored: string, secret: string): Promise<{ ok: boolean; legacy: boolean }> {
  if (stored.startsWith(PREFIX)) {
    const encode = (s: string) => new TextEncoder().encode(s);
    return { ok: constantTimeEqual(encode(stored), encode(hashSensorSecret(secret))), legacy: false };
  }
  const ok = await verify(stored, secret).catch(() => false);
  return { ok, legacy: ok };
}
