/** The process's bridges, one per site with an enabled configuration (kept across dev reloads). */
import { kept } from "~/.server/kept";
import { SiteBridge, type Deps } from "./runtime";
import type { BridgeState } from "./state";
import { enabledBridges, getBridge, listLinks, sealPlainPasswords } from "./store";

type Holder = { deps?: Deps; bridges: Map<number, SiteBridge> };
const holder = kept<Holder>("bridges", () => ({ bridges: new Map() }));

/** Starts every enabled bridge; returns the stop for the process's shutdown path. */
export async function startBridges(deps: Deps): Promise<() => Promise<void>> {
  holder.deps = deps;
  const sealed = await sealPlainPasswords();
  if (sealed) deps.log?.(`[bridge] ${sealed} stored broker password(s) encrypted at rest`);
  for (const config of await enabledBridges()) {
    const bridge = new SiteBridge(config, await listLinks(config.id), deps);
    holder.bridges.set(config.siteId, bridge);
    bridge.start();
  }
  return async () => {
    holder.deps = undefined;
    const all = [...holder.bridges.values()];
    holder.bridges.clear();
    await Promise.all(all.map((b) => b.stop()));
  };
}

/** After a change on the page: restarts the site's bridge with its new settings, or only updates its topics. */
export async function reloadBridge(siteId: number, opts: { restart: boolean }) {
  const deps = holder.deps;
  if (!deps) return; // bridges are not running in this process (a test, a one-off script)
  const config = await getBridge(siteId);
  const running = holder.bridges.get(siteId);
  if (running && !opts.restart && config?.enabled) return running.setLinks(await listLinks(config.id));
  if (running) {
    holder.bridges.delete(siteId);
    await running.stop();
  }
  if (!config?.enabled) return;
  const bridge = new SiteBridge(config, await listLinks(config.id), deps);
  holder.bridges.set(siteId, bridge);
  bridge.start();
}

export const bridgeState = (siteId: number): BridgeState | null => holder.bridges.get(siteId)?.state ?? null;
