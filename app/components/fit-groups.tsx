// A spot's answer: the verdict summary at the top of its page, and the fit list folded so the top
// few groups are shown in full and the rest as "19 groups: nights below their minimum".
import { FitList, type FitRow } from "~/components/season";
import { groupFits } from "~/domain/fit/summary";
import { VerdictMark, VerdictWords, type VerdictName } from "~/components/verdict-mark";
import { MonthStripKey } from "~/components/month-strip";

const listNames = (names: string[], max = 4) => {
  const short = names.map((n) => n.split(" (")[0]);
  return short.length <= max ? short.join(", ") : `${short.slice(0, max).join(", ")} and ${short.length - max} more`;
};

/** "Suits: …; possible with care: …; not here: …" — the spot's answer in one paragraph. */
/** `pastPeriod`: the grower chose twelve months other than the latest with readings. */
export function VerdictSummary({
  fits,
  period,
  days,
  pastPeriod = false,
}: {
  fits: FitRow[];
  period: string;
  days: number;
  pastPeriod?: boolean;
}) {
  const by = (v: string) => fits.filter((f) => f.verdict === v).map((f) => f.name);
  const parts: { verdict: VerdictName; label: string; names: string[] }[] = [
    { verdict: "thrives here", label: "Suits", names: by("thrives here") },
    { verdict: "possible with care", label: "Possible with care", names: by("possible with care") },
    { verdict: "good for part of the year", label: "For part of the year", names: by("good for part of the year") },
    { verdict: "not enough data yet", label: "Not judged yet", names: by("not enough data yet") },
    { verdict: "struggles here", label: "Not here", names: by("struggles here") },
  ];
  // A group whose verdicts all rest on projected months says so: "Likely possible with care".
  const projected = (v: string) => {
    const of = fits.filter((f) => f.verdict === v);
    return of.length > 0 && of.every((f) => f.confidence !== undefined && f.confidence !== "measured");
  };
  const shown = parts
    .filter((p) => p.names.length > 0)
    .map((p) =>
      p.verdict !== "not enough data yet" && projected(p.verdict)
        ? { ...p, label: `Likely ${p.label.toLowerCase()}` }
        : p,
    );
  const allUnknown = fits.length > 0 && shown.length === 1 && shown[0].verdict === "not enough data yet";
  if (days === 0)
    return (
      <div className="space-y-2" data-testid="verdict-summary">
        {pastPeriod ? (
          <>
            <p className="text-lg">
              No readings here in the twelve months chosen: pick a period with readings under the year strip.
            </p>
            <p className="text-sm text-muted" data-testid="judged-period">
              Judged on {period}.
            </p>
          </>
        ) : (
          <p className="text-lg">
            No readings here yet: place a sensor, and the first verdicts follow as the months fill in.
          </p>
        )}
      </div>
    );
  return (
    <div className="space-y-2" data-testid="verdict-summary">
      {allUnknown ? (
        <p className="text-lg">
          {days} {days === 1 ? "day" : "days"} of readings so far: too few to judge a year. Nothing here rules these
          groups out yet.
        </p>
      ) : null}
      <ul className="space-y-1.5">
        {shown.map((p) => (
          <li key={p.verdict} className="flex items-start gap-2">
            <VerdictMark verdict={p.verdict} size={18} />
            <p>
              <span className={`font-semibold ${p.verdict === "struggles here" ? "text-v-struggles" : ""}`}>
                {p.label}:
              </span>{" "}
              {p.verdict === "struggles here" || (p.verdict === "not enough data yet" && allUnknown) ? (
                <span>
                  {p.names.length} {p.names.length === 1 ? "group" : "groups"}
                  {p.names.length <= 3 ? ` (${listNames(p.names)})` : ""}
                </span>
              ) : (
                <span>{listNames(p.names, 5)}</span>
              )}
            </p>
          </li>
        ))}
      </ul>
      <p className="text-sm text-muted" data-testid="judged-period">
        Judged on {period}.
      </p>
    </div>
  );
}

/** The top few in full, the rest by verdict and shared first reason, with every group a "show all" away. */
export function GroupedFits({
  fits,
  top = 3,
  unit,
  siteId,
}: {
  fits: FitRow[];
  top?: number;
  unit: "C" | "F";
  siteId: number;
}) {
  const rest = groupFits(fits, top);
  return (
    <div data-testid="fit-list">
      {fits.some((f) => f.reasons.some((r) => r.strip)) ? (
        <div className="mb-2">
          <MonthStripKey />
        </div>
      ) : null}
      <FitList fits={fits.slice(0, top)} unit={unit} siteId={siteId} testId="fit-top" />
      {rest.length ? (
        <ul className="mt-2 space-y-2 border-t border-line pt-3" data-testid="fit-groups">
          {rest.map((g) => (
            <li key={`${g.verdict}|${g.gist}`} className="text-sm">
              <VerdictWords verdict={g.verdict} />
              <span className="ml-1">
                — {g.names.length} {g.names.length === 1 ? "group" : "groups"}: {g.gist}.
              </span>
              <span className="block text-muted">{listNames(g.names, 6)}</span>
            </li>
          ))}
        </ul>
      ) : null}
      {fits.length > top ? (
        <details className="mt-3 text-sm">
          <summary className="cursor-pointer font-medium">Show all {fits.length} groups with their reasons</summary>
          <FitList fits={fits.slice(top)} unit={unit} siteId={siteId} testId="fit-all" />
        </details>
      ) : null}
    </div>
  );
}
