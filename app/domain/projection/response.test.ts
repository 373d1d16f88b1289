// The response model on the simulator's demo spots, fitted on two January weeks.
import { describe, expect, it } from "vitest";
import { DEMO_HOUSEHOLD } from "../../../simulator/demo";
import { demoWeather, yearRollups } from "../../../simulator/projection-accuracy";
import { drivers } from "~/domain/projection/drivers";
import { fitResponse } from "~/domain/projection/response";

const site = DEMO_HOUSEHOLD.site;
const FROM = Date.UTC(2025, 0, 12);
const weather = demoWeather();

function fit(name: string) {
  const index = DEMO_HOUSEHOLD.spots.findIndex((s) => s.name === name);
  const spot = DEMO_HOUSEHOLD.spots[index];
  const rollups = yearRollups(index).filter(
    (r) => r.hour.getTime() >= FROM && r.hour.getTime() < FROM + 14 * 86_400_000,
  );
  const d = drivers(weather, site.timeZone, {
    latitude: site.latitude,
    longitude: site.longitude,
    facing: spot.indoor ? spot.facing : "none",
  });
  return fitResponse(rollups, d, { indoor: spot.indoor, timeZone: site.timeZone })!;
}

describe("fitResponse", () => {
  it("finds the thermostat's floor in a heated room in winter, at its night and day setpoints (17 and 20 °C in the simulator)", () => {
    const m = fit("Spare room (heated)");
    expect(m.floor).not.toBeNull();
    expect(m.floor![3]).toBeCloseTo(17, 0);
    expect(m.floor![14]).toBeCloseTo(20, 0);
    expect(m.quality!.hourlyRmseC).toBeLessThan(0.5);
  });

  it("finds no floor on the bench, which follows the air, and reports its error on held-out days", () => {
    const m = fit("Bench under the pear tree");
    expect(m.floor).toBeNull();
    expect(m.ceiling).toBeNull();
    expect(m.quality!.daysHeldOut).toBe(3);
    expect(m.quality!.hourlyRmseC).toBeLessThan(0.5);
    // Outdoors the spot is the air: the weights on the air now and smoothed sum to about 1.
    expect(m.beta[1] + m.beta[2] + m.beta[3] + m.beta[4]).toBeCloseTo(1, 0);
  });

  it("finds no floor on a windowsill that follows the outdoor air through the glass, and learns its humidity excess", () => {
    const m = fit("Kitchen sill (east)");
    expect(m.floor).toBeNull();
    expect(m.vapourExcessHpa).toBeGreaterThan(0);
    expect(m.quality!.hourlyRmseC).toBeLessThan(1);
  });

  it("says nothing from fewer than five days", () => {
    const rollups = yearRollups(0).filter((r) => r.hour.getTime() >= FROM && r.hour.getTime() < FROM + 4 * 86_400_000);
    expect(fitResponse(rollups, weather, { indoor: true, timeZone: site.timeZone })).toBeNull();
  });
});
