import { useState } from "react";
import { Form } from "react-router";
import { formatInZone } from "~/lib/time";

export function PlacingTips() {
  return (
    <ul className="list-disc space-y-1 pl-5 text-sm text-muted">
      <li>Put it at plant height, where the leaves will be — not on the floor or up by the ceiling.</li>
      <li>Keep direct sun off the sensor itself (a sunlit case reads several degrees too warm); shade it with a card if needed.</li>
      <li>Don't let it touch the glass or a wall: a finger's width of air keeps it reading the air, not the surface.</li>
    </ul>
  );
}

export function PlaceSensorForm({
  spots,
  sensors,
  timeZone,
  error,
  busy,
}: {
  spots?: { id: number; name: string }[];
  sensors?: { id: number; name: string }[];
  timeZone: string;
  error?: string;
  busy?: boolean;
}) {
  const [when, setWhen] = useState<"now" | "earlier">("now");
  return (
    <Form method="post" className="space-y-3">
      <input type="hidden" name="intent" value="place" />
      {spots ? (
        <div>
          <label className="label" htmlFor="spotId">
            Spot
          </label>
          <select id="spotId" name="spotId" className="field" required defaultValue="">
            <option value="" disabled>
              Choose a spot
            </option>
            {spots.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </div>
      ) : null}
      {sensors ? (
        <div>
          <label className="label" htmlFor="sensorId">
            Sensor
          </label>
          <select id="sensorId" name="sensorId" className="field" required defaultValue="">
            <option value="" disabled>
              Choose a sensor
            </option>
            {sensors.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </div>
      ) : null}
      <fieldset className="flex flex-wrap gap-4 text-sm">
        <legend className="label">When</legend>
        <label className="inline-flex items-center gap-2">
          <input type="radio" name="when" value="now" checked={when === "now"} onChange={() => setWhen("now")} /> Now
        </label>
        <label className="inline-flex items-center gap-2">
          <input type="radio" name="when" value="earlier" checked={when === "earlier"} onChange={() => setWhen("earlier")} /> Earlier
        </label>
      </fieldset>
      {when === "earlier" ? (
        <div>
          <label className="label" htmlFor="at">
            Moved at ({timeZone.replace(/_/g, " ")} time)
          </label>
          <input id="at" name="at" type="datetime-local" className="field" required />
          <p className="hint">Readings since then move to the new spot.</p>
        </div>
      ) : null}
      {error ? (
        <p className="error" role="alert">
          {error}
        </p>
      ) : null}
      <button className="btn" disabled={busy}>
        Place it
      </button>
    </Form>
  );
}

export function PlacementHistory({
  rows,
  timeZone,
  show,
}: {
  rows: { id: number; spotName: string; sensorName: string; fromAt: Date | string; toAt: Date | string | null }[];
  timeZone: string;
  show: "spot" | "sensor";
}) {
  if (rows.length === 0) return <p className="text-sm text-muted">Not placed yet.</p>;
  return (
    <ol className="space-y-2 text-sm" data-testid="placement-history">
      {rows.map((p) => (
        <li key={p.id} className="border-l-2 border-line pl-3">
          <p className="font-medium">{show === "spot" ? p.spotName : p.sensorName}</p>
          <p className="text-muted">
            {formatInZone(p.fromAt, timeZone)} → {p.toAt ? formatInZone(p.toAt, timeZone) : "now"}
          </p>
        </li>
      ))}
    </ol>
  );
}
