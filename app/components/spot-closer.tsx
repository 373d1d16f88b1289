// One level down on the spot page ("Charts and numbers"): the same year in other forms, kept where
// each adds something — the last 48 hours, day by day with the dew-point margin, the months and
// seasons in numbers, direct sun, the sensors placed here over time, and the exports.
import type { ComponentProps } from "react";
import { DirectSun } from "~/components/direct-sun";
import { PlacementHistory } from "~/components/placement";
import { SeasonTable } from "~/components/season";
import { HoursCharts, YearCharts } from "~/components/spot-charts";
import { SpotExports } from "~/components/spot-exports";
import type { DirectSunEstimate } from "~/domain/climate/sun";
import type { SlimProfile } from "~/domain/season/slim";
import type { TempUnit } from "~/domain/units";

export function SpotCloser({
  siteId,
  spotId,
  timeZone,
  unit,
  profile,
  directSun,
  hasLightSensor,
  history,
}: {
  siteId: number;
  spotId: number;
  timeZone: string;
  unit: TempUnit;
  profile: SlimProfile;
  directSun: DirectSunEstimate;
  hasLightSensor: boolean;
  /** The sensors placed in the spot over time. */
  history: ComponentProps<typeof PlacementHistory>["rows"];
}) {
  // The monthly envelope chart is not repeated here: the year strip above draws the same figures.
  return (
    <section id="closer" className="space-y-3" aria-labelledby="closer-heading">
      <h3 id="closer-heading" className="h2">
        Charts and numbers
      </h3>
      <details className="fold" data-testid="fold-48h">
        <summary>The last 48 hours, reading by reading</summary>
        <div>
          <HoursCharts url={`/api/sites/${siteId}/spots/${spotId}/series?range=48h`} unit={unit} timeZone={timeZone} />
        </div>
      </details>
      <details className="fold" data-testid="fold-days">
        <summary>Day by day through the year, and the dew-point margin</summary>
        <div className="space-y-4">
          <YearCharts url={`/api/sites/${siteId}/spots/${spotId}/series?range=year`} unit={unit} timeZone={timeZone} />
        </div>
      </details>
      <details className="fold" data-testid="fold-numbers">
        <summary>Month by month and season by season, in numbers</summary>
        <div>
          <SeasonTable months={profile.year} seasons={profile.seasons} unit={unit} />
        </div>
      </details>
      <DirectSun estimate={directSun} hasLightSensor={hasLightSensor} />
      <details className="fold">
        <summary>Sensors here over time</summary>
        <div>
          <PlacementHistory rows={history} timeZone={timeZone} show="sensor" />
        </div>
      </details>
      <SpotExports siteId={siteId} spotId={spotId} />
    </section>
  );
}
