// What the banner above every site page shows: the site's open alerts, early warnings of watches
// not yet crossed, and tonight's forecast warnings. The server builds it (alertBanner), the page
// and the banner's refresh read it; times travel as ISO strings.
import type { ForecastWarningFacts } from "~/domain/alerts/forecast-warning";
import type { AlertKind } from "~/domain/alerts/rules";

export type AlertBannerData = {
  open: {
    id: number;
    kind: AlertKind;
    spotId: number;
    spotName: string;
    startedAt: string;
    peak: number | null;
    threshold: number;
    acknowledgedBy: string | null;
  }[];
  warnings: {
    ruleId: number;
    kind: AlertKind;
    spotId: number;
    spotName: string;
    threshold: number;
    warnedAt: string;
  }[];
  forecast: (Omit<ForecastWarningFacts, "lowAt"> & { id: number; spotId: number; lowAt: string })[];
};
