// The one place where server state may outlive its module. In production the server is one module
// graph (app/.server/main.ts is built into React Router's SSR build), so this is a plain map. Only
// outside production does it sit on globalThis: `npm run dev` re-runs an edited server module
// (Vite's module runner) and the web-edge test runs main() beside Vite's own copy of the routes,
// and a pool, writer, broker or mailer made again there would be a second one.
const store: Map<string, unknown> =
  process.env.NODE_ENV === "production"
    ? new Map()
    : (((globalThis as Record<string, unknown>).__nichewiseKept ??= new Map()) as Map<string, unknown>);

/** The value kept under `key`, made by `make` the first time. */
export function kept<T>(key: string, make: () => T): T {
  if (!store.has(key)) store.set(key, make());
  return store.get(key) as T;
}
