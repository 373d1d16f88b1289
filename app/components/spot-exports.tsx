// Download links for a spot's data: readings raw or hourly, and the season profile, as CSV or JSON,
// for a chosen period (the last twelve months unless changed).
import { useState } from "react";
import { Link } from "react-router";

const day = (d: Date) => d.toISOString().slice(0, 10);

export function SpotExports({ siteId, spotId }: { siteId: number; spotId: number }) {
  const [to] = useState(() => day(new Date()));
  const [from] = useState(() => day(new Date(Date.now() - 364 * 86_400_000)));
  const base = `/api/sites/${siteId}/spots/${spotId}/export`;
  const kinds = [
    { what: "raw", label: "Every reading", note: "as measured, calibration applied" },
    { what: "hourly", label: "Hourly summary", note: "mean, lowest and highest of each hour" },
    { what: "profile", label: "Season profile", note: "per month and season" },
  ];
  return (
    <section className="card space-y-3" data-testid="spot-exports">
      <h3 className="h2">Download this spot's data</h3>
      <form method="get" action={base} className="space-y-3 text-sm">
        <div className="flex flex-wrap gap-3">
          <label className="flex flex-col">
            <span className="label">From</span>
            <input type="date" name="from" defaultValue={from} className="field w-auto" />
          </label>
          <label className="flex flex-col">
            <span className="label">To</span>
            <input type="date" name="to" defaultValue={to} className="field w-auto" />
          </label>
        </div>
        <fieldset className="space-y-1">
          <legend className="label">What</legend>
          {kinds.map((k, i) => (
            <label key={k.what} className="flex items-start gap-2">
              <input type="radio" name="what" value={k.what} defaultChecked={i === 1} className="mt-1" />
              <span>
                <span className="font-medium">{k.label}</span> <span className="text-muted">— {k.note}</span>
              </span>
            </label>
          ))}
        </fieldset>
        <div className="flex flex-wrap gap-2">
          <button className="btn" name="format" value="csv">
            Download CSV
          </button>
          <button className="btn-quiet" name="format" value="json">
            Download JSON
          </button>
        </div>
      </form>
      <p className="text-sm text-muted">
        Large periods stream as they download. Scripts can fetch the same files:{" "}
        <Link to="/help/api" className="link">
          API documentation
        </Link>
        .
      </p>
    </section>
  );
}
