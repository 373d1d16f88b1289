// The closed lists of words the app stores and forms offer, each defined once here. The database's
// enums (app/db/schema.server.ts) and the form schemas (app/forms/) are built from these arrays,
// so a value cannot be valid in one and unknown to the other. No imports: drizzle-kit loads this
// file with the schema.

/** The unit a member reads and types temperatures in (stored values are always °C). */
export const TEMPERATURE_UNITS = ["C", "F"] as const;
export type TempUnit = (typeof TEMPERATURE_UNITS)[number];

/** A member's role in a site: owners run it, carers look after the plants, mentors read and advise. */
export const ROLES = ["owner", "carer", "mentor"] as const;
export type Role = (typeof ROLES)[number];

/** The way a spot's window looks out; "none" for a spot not by a window. */
export const WINDOW_FACINGS = ["N", "NE", "E", "SE", "S", "SW", "W", "NW"] as const;
export type WindowFacing = (typeof WINDOW_FACINGS)[number];
export const SPOT_FACINGS = [...WINDOW_FACINGS, "none"] as const;
export type SpotFacing = (typeof SPOT_FACINGS)[number];
/** A facing in words, lower case ("north-east"). */
export const FACING_WORDS: Readonly<Record<WindowFacing, string>> = {
  N: "north",
  NE: "north-east",
  E: "east",
  SE: "south-east",
  S: "south",
  SW: "south-west",
  W: "west",
  NW: "north-west",
};

/** Where a spot is; stored as the spot's `indoor` flag. */
export const SPOT_PLACES = ["indoor", "outdoor"] as const;
export type SpotPlace = (typeof SPOT_PLACES)[number];

/**
 * What lights a spot, as the grower sets it per spot: it picks the lux → PPFD factor that the
 * spot's daily light integral uses (app/domain/climate/light.ts).
 */
export const LIGHT_SOURCES = ["sun", "led", "fluorescent", "mixed"] as const;
export type LightSource = (typeof LIGHT_SOURCES)[number];

/** A windowsill's glazing ("old_double": an older double unit, U ≈ 2.8), for the cold-glass rule. */
export const GLAZINGS = ["single", "double", "old_double", "triple", "none"] as const;
export type Glazing = (typeof GLAZINGS)[number];

/** What a watch (an alert rule of one spot) looks out for. */
export const WATCH_KINDS = ["cold", "heat", "dry", "condensation", "silent", "battery"] as const;
export type WatchKind = (typeof WATCH_KINDS)[number];

/** The roles an invitation can carry: an owner is made from a member, never invited. */
export const INVITABLE_ROLES = ["carer", "mentor"] as const satisfies readonly Role[];
export type InvitableRole = (typeof INVITABLE_ROLES)[number];
