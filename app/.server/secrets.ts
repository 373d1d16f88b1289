import { encodeBase32LowerCaseNoPadding } from "@oslojs/encoding";

/** A sensor's secret: 160 random bits, base32 so that it types on a phone and fits firmware forms. */
export function newSensorSecret() {
  const bytes = new Uint8Array(20);
  crypto.getRandomValues(bytes);
  return encodeBase32LowerCaseNoPadding(bytes);
}
