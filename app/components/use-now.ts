import { useEffect, useState } from "react";

/** The server's "now" while hydrating (so "5 min ago" matches), then the browser's, ticking. */
export function useNow(serverNow: number, everyMs = 15_000) {
  const [now, setNow] = useState(serverNow);
  useEffect(() => {
    // Hydrated: the browser's clock takes over from the server's (two-pass rendering of a client-only value).
    // eslint-disable-next-line react-hooks/set-state-in-effect -- the clock is outside React; this runs once per mount
    setNow(Date.now());
    const t = setInterval(() => setNow(Date.now()), everyMs);
    return () => clearInterval(t);
  }, [everyMs]);
  return now;
}
