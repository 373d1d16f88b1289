// The wishlist's pieces: one wished plant with its best spot and, for growers who may edit, its
// must-have and pots; and the table of room left in each spot once the plan is made.
import { Form, Link } from "react-router";
import { VerdictBadge } from "~/components/season";
import type { SpotRoom, WishRow } from "~/domain/fit/wishlist";
import { IntentButton } from "~/components/intent-button";

export function WishItem({
  row: r,
  siteId,
  canEdit,
  busy,
  error,
}: {
  row: WishRow;
  siteId: number;
  canEdit: boolean;
  busy: boolean;
  /** Why the last change of this row was refused. */
  error?: string;
}) {
  return (
    <li className="space-y-1.5 py-3">
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <Link to={`/sites/${siteId}/plants/${r.plantKey}`} className="link font-semibold">
          {r.name}
        </Link>
        {r.mustHave ? <span className="tag">must-have</span> : null}
        <span className="text-sm text-muted">
          {r.pots} {r.pots === 1 ? "pot" : "pots"}
        </span>
        {r.best ? (
          <span className="ml-auto">
            <VerdictBadge verdict={r.best.verdict} likely={r.best.likely} />
          </span>
        ) : null}
      </div>
      {r.everywhereStruggles && r.best ? (
        <p className="text-sm" data-testid="wish-struggles">
          {r.note}
          {r.best.reason ? (
            <span className="text-muted">
              {" "}
              Closest is {r.best.spot}: {r.best.reason}
            </span>
          ) : null}
        </p>
      ) : r.best ? (
        <>
          <p className="text-sm">
            Best spot: <span className="font-medium">{r.best.spot}</span>
            {r.best.reason ? <span className="text-muted"> — {r.best.reason}</span> : null}
          </p>
          {r.placed && r.placed.spot !== r.best.spot ? (
            <p className="text-sm" data-testid="wish-planned">
              Planned for <span className="font-medium">{r.placed.spot}</span> ({r.placed.verdict})
              {r.placed.reason ? <span className="text-muted"> — {r.placed.reason}</span> : null}
            </p>
          ) : null}
          {r.note ? <p className="text-sm text-care">{r.note}</p> : null}
        </>
      ) : r.note ? (
        <p className="text-sm text-care">{r.note}</p>
      ) : null}
      {canEdit ? (
        <div className="flex flex-wrap items-center gap-2">
          <Form method="post" className="flex flex-wrap items-center gap-2">
            <input type="hidden" name="intent" value="save" />
            <input type="hidden" name="plantKey" value={r.plantKey} />
            <label className="inline-flex items-center gap-1.5 text-sm">
              <input type="checkbox" name="mustHave" defaultChecked={r.mustHave} /> Must-have
            </label>
            <label className="sr-only" htmlFor={`pots-${r.plantKey}`}>
              Pots of {r.name}
            </label>
            <input
              id={`pots-${r.plantKey}`}
              name="pots"
              type="number"
              min={1}
              max={100}
              defaultValue={r.pots}
              className="field w-20 py-1 text-sm"
            />
            <button className="btn-quiet py-1 text-sm" disabled={busy}>
              Save
            </button>
            {error ? (
              <p className="error w-full" role="alert">
                {error}
              </p>
            ) : null}
          </Form>
          <IntentButton
            intent="remove"
            fields={{ plantKey: r.plantKey }}
            className="btn-quiet py-1 text-sm"
            busy={busy}
            label={`Remove ${r.name} from the wishlist`}
          >
            Remove
          </IntentButton>
        </div>
      ) : null}
    </li>
  );
}

export function RoomInSpots({ spots }: { spots: SpotRoom[] }) {
  return (
    <section className="card">
      <h3 className="h2 mb-3">Room in each spot</h3>
      {/* Under `sm` each spot is a card of label–value pairs (.stack-table), so "Left" is on a phone's screen. */}
      <div className="sm:-mx-5 sm:overflow-x-auto sm:px-5" tabIndex={0} role="region" aria-label="Room in each spot">
        <table className="table stack-table" data-testid="wishlist-room">
          <thead>
            <tr>
              <th>Spot</th>
              <th>Room for</th>
              <th>Standing now</th>
              <th>Must-haves planned</th>
              <th>Others planned</th>
              <th>Left</th>
            </tr>
          </thead>
          <tbody>
            {spots.map((s) => (
              <tr key={s.id}>
                <th scope="row" className="font-medium text-ink">
                  {s.name}
                </th>
                <td data-label="Room for">{s.capacity || "not set"}</td>
                <td data-label="Standing now">{s.standingPots}</td>
                <td data-label="Must-haves planned">{s.mustHavePots}</td>
                <td data-label="Others planned">{s.otherPots}</td>
                <td
                  data-label="Left"
                  data-testid="room-left"
                  className={s.free != null && s.free <= 0 ? "font-semibold text-care" : "font-semibold"}
                >
                  {s.free == null ? "–" : s.free <= 0 ? `none (${s.free})` : s.free}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
