// The site's open alerts and early warnings above every site page, refreshed every 15 s.
import { useEffect } from "react";
import { Link, useFetcher } from "react-router";
import type { AlertBannerData } from "~/domain/alerts/banner";
import { forecastHeadline } from "~/domain/alerts/forecast-warning";
import { formatValue } from "~/domain/alerts/messages";
import { KINDS } from "~/domain/alerts/rules";
import { WatchIcon } from "~/components/icons";

export function AlertBanner({ siteId, initial, unit }: { siteId: number; initial: AlertBannerData; unit: "C" | "F" }) {
  const live = useFetcher<AlertBannerData>();
  const { load } = live;
  useEffect(() => {
    const t = setInterval(() => {
      if (document.visibilityState === "visible") load(`/api/sites/${siteId}/alerts`);
    }, 15_000);
    return () => clearInterval(t);
  }, [siteId, load]);
  const { open, warnings, forecast = [] } = live.data ?? initial;
  if (open.length === 0 && warnings.length === 0 && forecast.length === 0) return null;
  return (
    <div
      role="alert"
      aria-label="Site alerts"
      className="mb-6 space-y-1.5 rounded-[0.2rem] border border-b-[3px] border-l-4 border-stone-line border-l-poor bg-card px-4 py-3 text-sm"
    >
      {open.map((e) => (
        <p key={`e${e.id}`}>
          <strong className="inline-flex items-baseline gap-1 text-poor">
            <WatchIcon size={16} className="self-center" />
            {KINDS[e.kind].label}
          </strong>{" "}
          at{" "}
          <Link className="link" to={`/sites/${siteId}/spots/${e.spotId}`}>
            {e.spotName}
          </Link>
          {e.kind === "silent"
            ? " — no readings are arriving; you cannot see a cold night coming."
            : ` — ${KINDS[e.kind].direction === "below" ? "lowest" : "highest"}` +
              ` ${e.peak != null ? formatValue(e.kind, e.peak, unit) : "–"}, ` +
              `line ${formatValue(e.kind, e.threshold, unit)}.`}{" "}
          {e.acknowledgedBy ? <span className="text-muted">Acknowledged by {e.acknowledgedBy}.</span> : null}{" "}
          <Link className="link font-medium" to={`/sites/${siteId}/alerts`}>
            See alerts
          </Link>
        </p>
      ))}
      {warnings.map((w) => (
        <p key={`w${w.ruleId}`}>
          <strong className="inline-flex items-baseline gap-1 text-v-care">
            <WatchIcon size={16} className="self-center" />
            Early warning
          </strong>{" "}
          at{" "}
          <Link className="link" to={`/sites/${siteId}/spots/${w.spotId}`}>
            {w.spotName}
          </Link>
          : at the last hour's rate it reaches {formatValue(w.kind, w.threshold, unit)} within the hour.
        </p>
      ))}
      {forecast.map((f) => (
        <p key={`f${f.id}`}>
          <strong className="inline-flex items-baseline gap-1 text-v-care">
            <WatchIcon size={16} className="self-center" />
            Cold night forecast:
          </strong>{" "}
          {forecastHeadline(f, unit)}{" "}
          <Link className="link font-medium" to={`/sites/${siteId}/spots/${f.spotId}`}>
            Open {f.spotName}
          </Link>{" "}
          <span className="text-muted">A forecast is a help, not a guarantee.</span>
        </p>
      ))}
    </div>
  );
}
