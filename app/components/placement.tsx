import { useState } from "react";
import { Form } from "react-router";
import { isFromFirstReading } from "~/lib/placements";
import { formatInZone } from "~/lib/date-words";
import { ChoiceSelect } from "~/components/field";

export function PlacingTips() {
  return (
    <ul className="list-disc space-y-1 pl-5 text-sm text-muted">
      <li>Put it at plant height, where the leaves will be — not on the floor or up by the ceiling.</li>
      <li>
        Keep direct sun off the sensor itself (a sunlit case reads several degrees too warm); shade it with a card if
        needed.
      </li>
      <li>
        Don't let it touch the glass or a wall: a finger's width of air keeps it reading the air, not the surface.
      </li>
    </ul>
  );
}

export function PlaceSensorForm({
  spots,
  sensors,
  timeZone,
  error,
  busy,
  allowFirst,
}: {
  spots?: { id: number; name: string }[];
  sensors?: { id: number; name: string }[];
  timeZone: string;
  error?: string;
  busy?: boolean;
  /** The sensor has never been placed: offer (and default to) "since its first reading". */
  allowFirst?: boolean;
}) {
  const [chosen, setWhen] = useState<"first" | "now" | "earlier">(allowFirst ? "first" : "now");
  const when = chosen === "first" && !allowFirst ? "now" : chosen; // placed meanwhile: "first" is gone
  return (
    <Form method="post" className="space-y-3">
      <input type="hidden" name="intent" value="place" />
      {spots ? (
        <div>
          <label className="label" htmlFor="spotId">
            Spot
          </label>
          <ChoiceSelect id="spotId" name="spotId" placeholder="Choose a spot" choices={spots} />
        </div>
      ) : null}
      {sensors ? (
        <div>
          <label className="label" htmlFor="sensorId">
            Sensor
          </label>
          <ChoiceSelect id="sensorId" name="sensorId" placeholder="Choose a sensor" choices={sensors} />
        </div>
      ) : null}
      <fieldset className="flex flex-wrap gap-4 text-sm">
        <legend className="label">When</legend>
        {allowFirst ? (
          <label className="inline-flex items-center gap-2">
            <input
              type="radio"
              name="when"
              value="first"
              checked={when === "first"}
              onChange={() => setWhen("first")}
            />{" "}
            Since its first reading
          </label>
        ) : null}
        <label className="inline-flex items-center gap-2">
          <input type="radio" name="when" value="now" checked={when === "now"} onChange={() => setWhen("now")} /> Now
        </label>
        <label className="inline-flex items-center gap-2">
          <input
            type="radio"
            name="when"
            value="earlier"
            checked={when === "earlier"}
            onChange={() => setWhen("earlier")}
          />{" "}
          Earlier
        </label>
      </fieldset>
      {when === "first" ? (
        <p className="hint">Everything it has sent or will send from before now goes to this spot too.</p>
      ) : null}
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
            {startLabel(p.fromAt, timeZone)} → {p.toAt ? formatInZone(p.toAt, timeZone) : "now"}
          </p>
        </li>
      ))}
    </ol>
  );
}

const startLabel = (at: Date | string, timeZone: string) =>
  isFromFirstReading(at) ? "its first reading" : formatInZone(at, timeZone);

type EditorRow = { id: number; spotId: number; spotName: string; fromAt: Date | string; toAt: Date | string | null };
type Stretch = {
  from: Date | string | null;
  to: Date | string | null;
  count: number;
  first: Date | string;
  last: Date | string;
};

/**
 * A sensor's placements, newest first, with the changes a grower makes when the record is wrong:
 * move a start, split a placement at a time into two spots, and put readings that fell outside
 * every placement into a spot. The CSV preview links here (#placements).
 */
export function PlacementEditor({
  rows,
  unplaced,
  spots,
  timeZone,
  canEdit,
  error,
  busy,
}: {
  rows: EditorRow[];
  unplaced: Stretch[];
  spots: { id: number; name: string }[];
  timeZone: string;
  canEdit: boolean;
  error?: string;
  busy?: boolean;
}) {
  const zone = timeZone.replace(/_/g, " ");
  const oldest = rows.at(-1);
  return (
    <div className="space-y-4">
      {unplaced.length > 0 ? (
        <div className="caution space-y-3" data-testid="unplaced">
          {unplaced.map((u) => (
            <div key={`${String(u.from)}-${String(u.to)}`} className="space-y-2">
              <p className="text-sm">
                <span className="font-semibold">
                  {u.count.toLocaleString("en")} {u.count === 1 ? "reading is" : "readings are"} in no spot
                </span>{" "}
                (
                {u.count === 1
                  ? formatInZone(u.first, timeZone)
                  : `${formatInZone(u.first, timeZone)} to ${formatInZone(u.last, timeZone)}`}
                ): they were sent for a time the sensor was not placed, so no spot's figures count them.
              </p>
              {canEdit ? (
                <Form method="post" className="flex flex-wrap items-end gap-2">
                  <input type="hidden" name="intent" value="assign" />
                  <input type="hidden" name="gapFrom" value={u.from ? new Date(u.from).getTime() : ""} />
                  <input type="hidden" name="gapTo" value={u.to ? new Date(u.to).getTime() : ""} />
                  <div>
                    <label className="label" htmlFor={`assign-${String(u.from)}`}>
                      They were in
                    </label>
                    <ChoiceSelect
                      id={`assign-${String(u.from)}`}
                      name="spotId"
                      className="field w-auto"
                      choices={spots}
                    />
                  </div>
                  <button className="btn-quiet" disabled={busy}>
                    Put them there
                  </button>
                </Form>
              ) : null}
            </div>
          ))}
        </div>
      ) : null}
      <PlacementHistory rows={rows.map((r) => ({ ...r, sensorName: "" }))} timeZone={timeZone} show="spot" />
      {canEdit && rows.length > 0 ? (
        <details className="text-sm">
          <summary className="cursor-pointer font-medium">Correct where it was</summary>
          <div className="mt-3 space-y-4">
            {rows.map((p) => (
              <div key={p.id} className="space-y-2 border-l-2 border-line pl-3" data-testid={`edit-placement-${p.id}`}>
                <p className="font-medium">
                  {p.spotName}: {startLabel(p.fromAt, timeZone)} → {p.toAt ? formatInZone(p.toAt, timeZone) : "now"}
                </p>
                <Form method="post" className="flex flex-wrap items-end gap-2">
                  <input type="hidden" name="intent" value="move-start" />
                  <input type="hidden" name="placementId" value={p.id} />
                  <div>
                    <label className="label" htmlFor={`start-${p.id}`}>
                      It got there at ({zone} time)
                    </label>
                    <input id={`start-${p.id}`} name="at" type="datetime-local" className="field w-auto" />
                  </div>
                  {p === oldest ? (
                    <label className="inline-flex items-center gap-2 pb-2">
                      <input type="checkbox" name="start" value="first" /> or since its first reading
                    </label>
                  ) : null}
                  <button className="btn-quiet" disabled={busy}>
                    Change the start
                  </button>
                </Form>
                <Form method="post" className="flex flex-wrap items-end gap-2">
                  <input type="hidden" name="intent" value="split" />
                  <input type="hidden" name="placementId" value={p.id} />
                  <div>
                    <label className="label" htmlFor={`split-at-${p.id}`}>
                      It was moved at ({zone} time)
                    </label>
                    <input id={`split-at-${p.id}`} name="at" type="datetime-local" className="field w-auto" required />
                  </div>
                  <div>
                    <label className="label" htmlFor={`split-to-${p.id}`}>
                      to
                    </label>
                    <ChoiceSelect
                      id={`split-to-${p.id}`}
                      name="spotId"
                      className="field w-auto"
                      choices={spots.filter((s) => s.id !== p.spotId)}
                    />
                  </div>
                  <button className="btn-quiet" disabled={busy}>
                    Split it there
                  </button>
                </Form>
              </div>
            ))}
            <p className="hint">Each change rebuilds the figures of every spot it touches.</p>
          </div>
        </details>
      ) : null}
      {error ? (
        <p className="error" role="alert">
          {error}
        </p>
      ) : null}
    </div>
  );
}
