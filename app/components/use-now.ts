import { useEffect, useState } from "react";

/** The server's "now" while hydrating (so "5 min ago" matches), then the browser's, ticking. */
export function useNow(serverNow: number, everyMs = 15_000) {
  const [now, setNow] = useState(serverNow);
  useEffect(() => {
    setNow(Date.now());
    const t = setInterval(() => setNow(Date.now()), everyMs);
    return () => clearInterval(t);
  }, [everyMs]);
  return now;
}
