import { describe, expect, it } from "vitest";
import { alertKindEnum, facingEnum, glazingEnum, lightSourceEnum, roleEnum, users } from "~/db/schema.server";
import { ALERT_KINDS } from "~/domain/alerts/rules";
import { GLAZINGS, LIGHT_SOURCES, ROLES, SPOT_FACINGS, TEMPERATURE_UNITS, WATCH_KINDS } from "~/domain/vocabulary";
import { spotSchema } from "~/forms/spot";

// One definition per closed list (issue 18): the database enums and the forms use the same arrays.
describe("each closed list is defined once", () => {
  it("the database enums hold the vocabulary's values", () => {
    expect(roleEnum.enumValues).toEqual(ROLES);
    expect(facingEnum.enumValues).toEqual(SPOT_FACINGS);
    expect(lightSourceEnum.enumValues).toEqual(LIGHT_SOURCES);
    expect(glazingEnum.enumValues).toEqual(GLAZINGS);
    expect(alertKindEnum.enumValues).toEqual(WATCH_KINDS);
    expect(users.temperatureUnit.enumValues).toEqual(TEMPERATURE_UNITS);
  });
  it("the spot form offers exactly the stored facings, light sources and glazings", () => {
    expect(spotSchema.shape.facing.options).toEqual([...SPOT_FACINGS]);
    expect(spotSchema.shape.lightSource.unwrap().options).toEqual([...LIGHT_SOURCES]);
    expect(spotSchema.shape.glazing.unwrap().options).toEqual([...GLAZINGS]);
    expect(ALERT_KINDS).toEqual([...WATCH_KINDS]);
  });
});
