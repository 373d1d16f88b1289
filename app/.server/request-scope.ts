// What the web adapter knows about the request being served, for code deep in a loader that does
// not get the load context (session renewal).
import { AsyncLocalStorage } from "node:async_hooks";
import { kept } from "~/.server/kept";

export type RequestScope = {
  /** Set by the session module when it moved a session's expiry; the adapter sends the cookie again. */
  renewedSession?: { token: string; expiresAt: Date };
};

export const requestScope = kept("request-scope", () => new AsyncLocalStorage<RequestScope>());
