// A spot's answer: the verdict summary at the top of its page, and the fit list folded so the top
// few groups are shown in full and the rest as "19 groups: nights below their minimum".
import { FitList, type FitRow } from "~/components/season";
import { VerdictMark, VerdictWords, type VerdictName } from "~/components/verdict-mark";

/** What a group's first reason is about, in words that fit many groups at once. */
const REASON_GIST: Record<string, string> = {
  "cold-nights": "nights below their minimum",
  "warm-nights": "nights too warm for them",
  "hot-days": "days above their maximum",
  humidity: "air too dry or too damp for them",
  light: "light that does not suit them, or is not known",
  flowering: "no cue to flower",
  condensation: "leaves wet with dew",
  "cold-glass": "cold glass by the window",
  seasonal: "good only for a run of months",
};

export const gistOf = (f: Pick<FitRow, "verdict" | "reasons" | "missingMonths">) => {
  const first = f.reasons[0];
  if (first) return REASON_GIST[first.rule] ?? "other reasons";
  if (f.verdict === "not enough data yet") return "months still without enough readings";
  return "nothing asks for care";
};

const ORDER: VerdictName[] = ["thrives here", "possible with care", "good for part of the year", "not enough data yet", "struggles here"];

export type FitGroup = { verdict: string; gist: string; names: string[] };

/** Groups the fits after the top `top` by verdict, then by the gist of their first reason, biggest first within a verdict. */
export function groupFits(fits: FitRow[], top: number): FitGroup[] {
  const groups = new Map<string, FitGroup>();
  for (const f of fits.slice(top)) {
    const gist = gistOf(f);
    const key = `${f.verdict}|${gist}`;
    const g = groups.get(key) ?? { verdict: f.verdict, gist, names: [] };
    g.names.push(f.name);
    groups.set(key, g);
  }
  return [...groups.values()].sort(
    (a, b) => ORDER.indexOf(a.verdict as VerdictName) - ORDER.indexOf(b.verdict as VerdictName) || b.names.length - a.names.length,
  );
}

const listNames = (names: string[], max = 4) => {
  const short = names.map((n) => n.split(" (")[0]);
  return short.length <= max ? short.join(", ") : `${short.slice(0, max).join(", ")} and ${short.length - max} more`;
};

/** "Suits: …; possible with care: …; not here: …" — the spot's answer in one paragraph. */
export function VerdictSummary({ fits, period, days }: { fits: FitRow[]; period: string; days: number }) {
  const by = (v: string) => fits.filter((f) => f.verdict === v).map((f) => f.name);
  const parts: { verdict: VerdictName; label: string; names: string[] }[] = [
    { verdict: "thrives here", label: "Suits", names: by("thrives here") },
    { verdict: "possible with care", label: "Possible with care", names: by("possible with care") },
    { verdict: "good for part of the year", label: "For part of the year", names: by("good for part of the year") },
    { verdict: "not enough data yet", label: "Not judged yet", names: by("not enough data yet") },
    { verdict: "struggles here", label: "Not here", names: by("struggles here") },
  ];
  const shown = parts.filter((p) => p.names.length > 0);
  const allUnknown = fits.length > 0 && shown.length === 1 && shown[0].verdict === "not enough data yet";
  return (
    <div className="space-y-2" data-testid="verdict-summary">
      {days === 0 ? (
        <p className="text-lg">No readings here yet: place a sensor and the first verdicts follow as the months fill in.</p>
      ) : allUnknown ? (
        <p className="text-lg">
          {days} {days === 1 ? "day" : "days"} of readings so far: too few to judge a year. Nothing here rules a group out yet.
        </p>
      ) : null}
      <ul className="space-y-1.5">
        {shown.map((p) => (
          <li key={p.verdict} className="flex items-start gap-2">
            <VerdictMark verdict={p.verdict} size={18} />
            <p>
              <span className={`font-semibold ${p.verdict === "struggles here" ? "text-v-struggles" : ""}`}>{p.label}:</span>{" "}
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
export function GroupedFits({ fits, top = 3, unit, siteId }: { fits: FitRow[]; top?: number; unit: "C" | "F"; siteId: number }) {
  const rest = groupFits(fits, top);
  return (
    <div data-testid="fit-list">
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
