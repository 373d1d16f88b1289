import { it } from "vitest";
import { spotYear, steadyRoom } from "~/domain/fit/season-fixture";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { rankPlantsForSpot } from "~/domain/fit/verdict";
import { describeReason } from "~/domain/fit/describe";
it("probe", () => {
  const room = spotYear({ month: () => ({ night: 18, day: 24, rh: 55, dpMargin: 8 }) });
  for (const { plant, fit } of rankPlantsForSpot(PLANT_LIBRARY, room, undefined, { latitude: 51.5, facing: "E", indoor: true })) {
    console.log(plant.key, fit.verdict, JSON.stringify(fit.miss), fit.reasons.filter((r) => r.level !== "good").map((r) => r.rule + ":" + r.level + ":" + describeReason(r)).join(" | "));
  }
});
