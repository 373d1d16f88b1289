// How a spot's fits read at a glance: the groups after the top few gathered by verdict and by the
// gist of their first reason ("19 groups: nights below their minimum"). Pure, shared by the page.
import { VERDICT_ORDER, type Verdict } from "~/domain/fit/verdict";

export type FitLike = { name: string; verdict: string; reasons: { rule: string }[] };

/** What a group's first reason is about, in words that fit many groups at once. */
const REASON_GIST: Record<string, string> = {
  "cold-nights": "nights below their minimum",
  "warm-nights": "nights too warm for them",
  "hot-days": "days above their maximum",
  humidity: "air too dry or too damp for them",
  light: "light that does not suit them, or is not known",
  flowering: "no cue to flower",
  condensation: "leaves wet with dew",
  seasonal: "good only for a run of months",
};

export const gistOf = (f: Pick<FitLike, "verdict" | "reasons">) => {
  // "Good for part of the year" says the season already: name what rules out the rest of it.
  const first = f.reasons.find((r) => r.rule !== "seasonal") ?? f.reasons[0];
  if (first) return REASON_GIST[first.rule] ?? "other reasons";
  if (f.verdict === "not enough data yet") return "months still without enough readings";
  return "nothing asks for care";
};

export type FitGroup = { verdict: string; gist: string; names: string[] };

/** Groups the fits after the top `top` by verdict, then by the gist of their first reason, biggest first within a verdict. */
export function groupFits(fits: FitLike[], top: number): FitGroup[] {
  const groups = new Map<string, FitGroup>();
  for (const f of fits.slice(top)) {
    const gist = gistOf(f);
    const key = `${f.verdict}|${gist}`;
    const g = groups.get(key) ?? { verdict: f.verdict, gist, names: [] };
    g.names.push(f.name);
    groups.set(key, g);
  }
  return [...groups.values()].sort(
    (a, b) =>
      VERDICT_ORDER.indexOf(a.verdict as Verdict) - VERDICT_ORDER.indexOf(b.verdict as Verdict) ||
      b.names.length - a.names.length,
  );
}
