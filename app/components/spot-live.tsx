// The "Now:" line under a spot's answer: its latest reading, fetched again every 20 s while the
// page is visible, and how long ago it was measured.
import { useEffect } from "react";
import { useFetcher } from "react-router";
import { useNow } from "~/components/use-now";
import { formatTemp, type TempUnit } from "~/domain/units";
import { timeAgo } from "~/lib/date-words";

/** The spot's latest reading as the spot page's loader and `/api/…/latest` give it. */
export type LatestReading = { measured_at: string; temp: number | null; rh: number | null };

/** `serverNow`: the loader's clock, so "5 min ago" matches while hydrating. */
export function LiveTile({
  siteId,
  spotId,
  initial,
  serverNow,
  unit,
}: {
  siteId: number;
  spotId: number;
  initial: LatestReading | null;
  serverNow: number;
  unit: TempUnit;
}) {
  const now = useNow(serverNow);
  const live = useFetcher<{ latest: LatestReading | null }>();
  const { load } = live;
  useEffect(() => {
    const t = setInterval(() => {
      if (document.visibilityState === "visible") load(`/api/sites/${siteId}/spots/${spotId}/latest`);
    }, 20_000);
    return () => clearInterval(t);
  }, [siteId, spotId, load]);
  const latest = live.data?.latest ?? initial;
  return (
    <div
      className="mt-3 border-t border-stone-line pt-2 text-sm text-muted tabular-nums"
      aria-live="polite"
      data-testid="live-tile"
    >
      {latest ? (
        <p>
          Now: <span className="font-semibold text-ink">{formatTemp(latest.temp, unit)}</span>
          {latest.rh != null ? `, ${Math.round(latest.rh)} % RH` : ""}, measured {timeAgo(latest.measured_at, now)}
        </p>
      ) : (
        <p>Waiting for the first reading.</p>
      )}
    </div>
  );
}
