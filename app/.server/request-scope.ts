// What the web adapter knows about the request being served, for code deep in a loader that does
// not get the load context (session renewal). Kept on globalThis: the server build and the process
// entry each load their own copy of this module, and both must see the same storage.
import { AsyncLocalStorage } from "node:async_hooks";

export type RequestScope = {
  /** Set by the session module when it moved a session's expiry; the adapter sends the cookie again. */
  renewedSession?: { token: string; expiresAt: Date };
};

const key = "__nichewiseRequestScope";
export const requestScope: AsyncLocalStorage<RequestScope> = ((globalThis as Record<string, unknown>)[key] ??=
  new AsyncLocalStorage<RequestScope>()) as AsyncLocalStorage<RequestScope>;
