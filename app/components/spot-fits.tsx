// "Every group, best first" on the spot page: the fits grouped by verdict (or one line while none
// can be judged yet), the cold-glass and light notes, and how a verdict is decided.
import { GroupedFits } from "~/components/fit-groups";
import { LightNotes } from "~/components/light-notes";
import type { FitRow } from "~/components/season";
import type { SlimProfile } from "~/domain/season/slim";
import type { TempUnit } from "~/domain/units";
import type { Glazing, LightSource, SpotFacing } from "~/domain/vocabulary";

export function SpotFits({
  fits,
  unit,
  siteId,
  spot,
  glazing,
  profile,
  verdictRules,
  hasDayOne,
}: {
  fits: FitRow[];
  unit: TempUnit;
  siteId: number;
  spot: { indoor: boolean; facing: SpotFacing; lightSource: LightSource };
  /** The window's glazing, and whether cold glass could be judged from it. */
  glazing: { chosen: Glazing | null; judged: boolean };
  profile: SlimProfile;
  verdictRules: { verdict: string; when: string }[];
  /** The day-one view is shown above. */
  hasDayOne: boolean;
}) {
  const allUnjudged = fits.length > 0 && fits.every((f) => f.verdict === "not enough data yet");
  return (
    <section id="fits" className="card">
      <h3 className="h2 mb-1">Every group, best first</h3>
      <p className="mb-3 text-sm text-muted">
        The best few in full; the rest gathered by verdict and by what holds them back.
      </p>
      {allUnjudged ? (
        // One line instead of a wall of identical rows: nothing is judged yet (issue 16).
        <p data-testid="fits-unjudged">
          None of the {fits.length} groups can be judged yet:{" "}
          {fits[0]?.missingAdvice ?? "too few days of readings here."}
          {hasDayOne ? " What is known already is above." : ""}
        </p>
      ) : (
        <GroupedFits fits={fits} unit={unit} siteId={siteId} />
      )}
      {spot.indoor && spot.facing !== "none" ? (
        <p className="mt-4 text-sm text-muted" data-testid="glazing-note">
          {glazing.judged
            ? `Cold glass judged for ${glazing.chosen?.replace("_", " ")} glazing, from the site's outdoor spot.`
            : glazing.chosen
              ? "Cold glass needs an outdoor spot with readings on this site to know the cold outside."
              : "Name the window's glazing under Edit spot to judge condensation on cold glass."}
        </p>
      ) : null}
      <LightNotes profile={profile} lightSource={spot.lightSource} />
      <details className="mt-4 text-sm">
        <summary className="cursor-pointer font-medium">How the verdict is decided</summary>
        <ol className="mt-2 list-decimal space-y-1 pl-5 text-muted">
          {verdictRules.map((r) => (
            <li key={r.verdict}>
              <span className="font-medium text-ink">{r.verdict}</span>: {r.when}
            </li>
          ))}
        </ol>
      </details>
    </section>
  );
}
