// The bridge's rows: one function per change, each in one transaction with its audit row.
import { and, eq, isNotNull, notLike } from "drizzle-orm";
import { randomBytes } from "node:crypto";
import { db } from "~/.server/db";
import { bridgeLinks, bridges, sensors, auditLog } from "~/db/schema.server";
import type { Mapping } from "~/domain/payloads/presets";
import { isSealed, openBridgePassword, sealBridgePassword, SecretError } from "./secret";

export type BridgeConfig = {
  id: number;
  siteId: number;
  url: string;
  username: string | null;
  /** In clear, opened with the server's key (the column holds it sealed: ./secret.ts). */
  password: string | null;
  /** Why the stored password could not be opened (another key), or null. */
  passwordError: string | null;
  caCert: string | null;
  protocolVersion: 4 | 5;
  clientId: string;
  enabled: boolean;
  updatedAt: Date;
};
export type BridgeLink = { id: number; sensorId: number; topic: string; device: string; mapping: Mapping };

/** What a page may see of a bridge: never the password, only whether there is one. */
export type BridgeView = Omit<BridgeConfig, "password"> & { hasPassword: boolean };

function asConfig(r: typeof bridges.$inferSelect): BridgeConfig {
  let password: string | null = null;
  let passwordError: string | null = null;
  try {
    password = r.password === null ? null : openBridgePassword(r.siteId, r.password);
  } catch (err) {
    if (!(err instanceof SecretError)) throw err;
    passwordError = err.message;
  }
  return { ...r, password, passwordError, protocolVersion: r.protocolVersion === 5 ? 5 : 4 };
}

/** Seals the passwords stored in plain text before encryption at rest; run at start. Returns how many. */
export async function sealPlainPasswords(): Promise<number> {
  const plain = await db()
    .select({ id: bridges.id, siteId: bridges.siteId, password: bridges.password })
    .from(bridges)
    .where(and(isNotNull(bridges.password), notLike(bridges.password, "v1:%")));
  for (const r of plain) {
    await db()
      .update(bridges)
      .set({ password: sealBridgePassword(r.siteId, r.password!) })
      .where(and(eq(bridges.id, r.id), eq(bridges.password, r.password!)));
  }
  return plain.length;
}

export async function getBridge(siteId: number): Promise<BridgeConfig | null> {
  const [r] = await db().select().from(bridges).where(eq(bridges.siteId, siteId));
  return r ? asConfig(r) : null;
}

export function viewOf(c: BridgeConfig): BridgeView {
  const { password, ...rest } = c;
  return { ...rest, hasPassword: !!password || !!rest.passwordError };
}

export async function enabledBridges(): Promise<BridgeConfig[]> {
  return (await db().select().from(bridges).where(eq(bridges.enabled, true))).map(asConfig);
}

export async function listLinks(bridgeId: number): Promise<BridgeLink[]> {
  return db()
    .select({
      id: bridgeLinks.id,
      sensorId: bridgeLinks.sensorId,
      topic: bridgeLinks.topic,
      device: bridgeLinks.device,
      mapping: bridgeLinks.mapping,
    })
    .from(bridgeLinks)
    .where(eq(bridgeLinks.bridgeId, bridgeId))
    .orderBy(bridgeLinks.topic, bridgeLinks.device);
}

async function audit(
  tx: Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0],
  siteId: number,
  actorId: number | null,
  action: string,
  detail: Record<string, unknown>,
) {
  await tx.insert(auditLog).values({ siteId, actorId, action, detail } as typeof auditLog.$inferInsert);
}

export async function saveBridge(opts: {
  siteId: number;
  actorId: number | null;
  url: string;
  username: string | null;
  /** null keeps the stored one. */
  password: string | null;
  clearPassword: boolean;
  caCert: string | null;
  protocolVersion: number;
  enabled: boolean;
}): Promise<BridgeConfig> {
  return db().transaction(async (tx) => {
    const [old] = await tx.select().from(bridges).where(eq(bridges.siteId, opts.siteId));
    // A typed password is sealed; a kept one too if it was stored in plain text before.
    const kept = old?.password ?? null;
    const password = opts.clearPassword
      ? null
      : opts.password !== null
        ? sealBridgePassword(opts.siteId, opts.password)
        : kept !== null && !isSealed(kept)
          ? sealBridgePassword(opts.siteId, kept)
          : kept;
    const values = {
      url: opts.url,
      username: opts.username,
      password,
      caCert: opts.caCert,
      protocolVersion: opts.protocolVersion,
      enabled: opts.enabled,
      updatedAt: new Date(),
    };
    const [row] = old
      ? await tx.update(bridges).set(values).where(eq(bridges.id, old.id)).returning()
      : await tx
          .insert(bridges)
          .values({
            ...values,
            siteId: opts.siteId,
            clientId: `nichewise-${opts.siteId}-${randomBytes(4).toString("hex")}`,
          })
          .returning();
    await audit(tx, opts.siteId, opts.actorId, "bridge.save", {
      url: opts.url,
      username: opts.username,
      protocolVersion: opts.protocolVersion,
      enabled: opts.enabled,
    });
    return asConfig(row);
  });
}

export class LinkError extends Error {}

/** Attaches a topic (or one device in it) to a sensor of the same site; attaching again replaces the mapping. */
export async function attachTopic(opts: {
  siteId: number;
  actorId: number | null;
  sensorId: number;
  topic: string;
  mapping: Mapping;
}) {
  return db().transaction(async (tx) => {
    const [bridge] = await tx.select({ id: bridges.id }).from(bridges).where(eq(bridges.siteId, opts.siteId));
    if (!bridge) throw new LinkError("Connect the home broker first.");
    const [sensor] = await tx
      .select({ id: sensors.id })
      .from(sensors)
      .where(and(eq(sensors.id, opts.sensorId), eq(sensors.siteId, opts.siteId)));
    if (!sensor) throw new LinkError("That sensor is not in this site.");
    const device = opts.mapping.device ?? "";
    await tx
      .insert(bridgeLinks)
      .values({ bridgeId: bridge.id, sensorId: sensor.id, topic: opts.topic, device, mapping: opts.mapping })
      .onConflictDoUpdate({
        target: [bridgeLinks.bridgeId, bridgeLinks.topic, bridgeLinks.device],
        set: { sensorId: sensor.id, mapping: opts.mapping },
      });
    await audit(tx, opts.siteId, opts.actorId, "bridge.attach", {
      sensorId: sensor.id,
      topic: opts.topic,
      device,
      preset: opts.mapping.preset,
    });
  });
}

export async function detachTopic(opts: { siteId: number; actorId: number | null; linkId: number }) {
  await db().transaction(async (tx) => {
    const [bridge] = await tx.select({ id: bridges.id }).from(bridges).where(eq(bridges.siteId, opts.siteId));
    if (!bridge) return;
    const [gone] = await tx
      .delete(bridgeLinks)
      .where(and(eq(bridgeLinks.id, opts.linkId), eq(bridgeLinks.bridgeId, bridge.id)))
      .returning({ topic: bridgeLinks.topic, device: bridgeLinks.device });
    if (gone) await audit(tx, opts.siteId, opts.actorId, "bridge.detach", gone);
  });
}
