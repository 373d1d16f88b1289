// The logged water checks: the latest of each source with its verdict and reasons, and the table of
// every check with its remove button (for those who may log).
import { DropMark, WATER_VERDICT } from "~/components/water-marks";
import { ppmLabel, sourceName, type LoggedCheck } from "~/domain/water/logged-check";
import { formatInZone } from "~/lib/date-words";
import { IntentButton } from "~/components/intent-button";

const day = (d: Date | string, timeZone: string) => formatInZone(d, timeZone, { hour: undefined, minute: undefined });

export function LatestChecks({
  checks,
  sources,
  timeZone,
  canLog,
}: {
  checks: LoggedCheck[];
  sources: string[];
  timeZone: string;
  canLog: boolean;
}) {
  const latest = sources.map((s) => checks.filter((c) => c.source === s).at(-1)!);
  if (!latest.length)
    return <p className="card text-muted">No water checks yet.{canLog ? " Log the first one below." : ""}</p>;
  return (
    <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" data-testid="water-sources">
      {latest.map((c) => {
        const v = WATER_VERDICT[c.verdict];
        return (
          <section key={c.source} className="card">
            <h3 className="h2">{sourceName(c.source)}</h3>
            <p className="text-sm text-muted">Last checked {day(c.checkedOn, timeZone)}</p>
            <p className={`mt-2 font-semibold ${v.cls}`}>
              <DropMark verdict={c.verdict} />
              {v.word}
            </p>
            <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
              {c.reasons.map((r) => (
                <li key={r}>{r}</li>
              ))}
            </ul>
            <p className="mt-2 text-xs text-muted">{ppmLabel(c)}</p>
          </section>
        );
      })}
    </div>
  );
}

export function AllChecks({
  checks,
  timeZone,
  canLog,
  busy,
}: {
  checks: LoggedCheck[];
  timeZone: string;
  canLog: boolean;
  busy: boolean;
}) {
  return (
    <section className="card relative overflow-x-auto" tabIndex={0} aria-labelledby="water-all-checks">
      <h3 id="water-all-checks" className="h2 mb-3">
        All checks
      </h3>
      {checks.length === 0 ? (
        <p className="text-sm text-muted">None yet.</p>
      ) : (
        <table className="table" data-testid="water-checks">
          <thead>
            <tr>
              <th>Date</th>
              <th>Source</th>
              <th>Dissolved solids</th>
              <th>pH</th>
              <th>Verdict</th>
              <th className="hidden sm:table-cell">By</th>
              {canLog ? (
                <th>
                  <span className="sr-only">Remove</span>
                </th>
              ) : null}
            </tr>
          </thead>
          <tbody>
            {[...checks].reverse().map((c) => (
              <tr key={c.id}>
                <td className="whitespace-nowrap">{day(c.checkedOn, timeZone)}</td>
                <td>{sourceName(c.source)}</td>
                <td>{ppmLabel(c)}</td>
                <td>
                  {c.ph ?? "–"}
                  {c.ph != null && c.buffered === false ? (
                    <span className="text-xs text-muted"> (no buffer: not judged)</span>
                  ) : null}
                </td>
                <td className={WATER_VERDICT[c.verdict].cls}>
                  <DropMark verdict={c.verdict} />
                  {c.verdict === "good" ? "good" : c.verdict === "adjust" ? "needs attention" : "not for routine use"}
                </td>
                <td className="hidden sm:table-cell">{c.byName ?? "–"}</td>
                {canLog ? (
                  <td>
                    <IntentButton
                      intent="delete"
                      fields={{ checkId: c.id }}
                      className="text-xs text-muted underline hover:text-poor"
                      busy={busy}
                      ask="Remove this water check?"
                    >
                      Remove
                    </IntentButton>
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
