// The invented demo household: where it is, its spots, and how each spot is simulated.
import { scenarioAt, type SimSite, type SimSpot } from "./model";

export const DEMO_HOUSEHOLD = {
  site: { name: "Hollins Lane", latitude: 51.7, longitude: -2.2, timeZone: "Europe/London" } satisfies SimSite & {
    name: string;
  },
  // The very climate the local weather service fake serves for this place (DEMO_SCENARIO), so the
  // backfill, the live sensors and the stored outdoor weather agree hour by hour.
  scenario: scenarioAt(51.7, -2.2),
  people: {
    owner: { email: "owner@nichewise.test", name: "Wren Ashdown", password: "greenhouse-demo-1" },
    carer: { email: "carer@nichewise.test", name: "Jory Ashdown", password: "greenhouse-demo-2" },
    mentor: { email: "mentor@nichewise.test", name: "Hettie Marlowe", password: "greenhouse-demo-3" },
    admin: { email: "admin@nichewise.test", name: "Installation admin", password: "greenhouse-admin-4" },
  },
  spots: [
    {
      name: "Kitchen sill (east)",
      indoor: true,
      glazing: "double",
      facing: "E",
      capacity: 6,
      notes: "Above the sink; blind down on summer mornings.",
      sim: { kind: "windowsill", facing: "E", hasLight: true },
      sensor: { name: "Kitchen sill sensor", seed: 102, channels: ["temperature", "humidity", "lux", "battery"] },
    },
    {
      name: "Landing sill (south-west)",
      indoor: true,
      glazing: "old_double",
      facing: "SW",
      capacity: 4,
      notes: "Single glazing; cold at night in winter.",
      sim: { kind: "windowsill", facing: "SW", hasLight: true },
      sensor: { name: "Landing sensor", seed: 105, channels: ["temperature", "humidity", "lux", "battery"] },
    },
    {
      name: "Bathroom shelf",
      indoor: true,
      glazing: "single",
      facing: "N",
      capacity: 3,
      notes: "Frosted north window; steamy after morning showers.",
      sim: { kind: "bathroom", facing: "N", hasLight: false },
      sensor: { name: "Bathroom sensor", seed: 103, channels: ["temperature", "humidity", "battery"] },
    },
    {
      name: "Spare room (heated)",
      indoor: true,
      facing: "none",
      capacity: 10,
      notes: "Radiator on a thermostat; shelves away from the window.",
      sim: { kind: "heated-room", facing: "none", hasLight: false },
      sensor: { name: "Spare room sensor", seed: 104, channels: ["temperature", "humidity", "battery"] },
    },
    {
      name: "Bench under the pear tree",
      indoor: false,
      facing: "none",
      capacity: 12,
      notes: "Dappled shade; plants go out late May and come in before the first frost.",
      sim: { kind: "outdoor", facing: "none", hasLight: true },
      sensor: { name: "Bench sensor", seed: 101, channels: ["temperature", "humidity", "lux", "battery"] },
    },
  ] satisfies {
    name: string;
    indoor: boolean;
    facing: SimSpot["facing"];
    /** A windowsill's glazing, for the cold-glass rule (the database's glazing names). */
    glazing?: "single" | "double" | "old_double" | "triple";
    capacity: number;
    notes: string;
    sim: SimSpot;
    sensor: { name: string; seed: number; channels: ("temperature" | "humidity" | "lux" | "battery")[] };
  }[],
};

export type DemoSensorCredentials = { sensorId: number; secret: string; spotIndex: number }[];
