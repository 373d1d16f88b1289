// The one schema file. camelCase here, snake_case in SQL (drizzle `casing: "snake_case"`).
// `readings` is partitioned by month in SQL (see drizzle/0001_partition_readings.sql); Drizzle only
// needs its columns to query it.
import { sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  serial,
  smallint,
  text,
  timestamp,
  uniqueIndex,
} from "drizzle-orm/pg-core";
// Relative: drizzle-kit loads this file without the app's path aliases.
import { GLAZINGS, LIGHT_SOURCES, ROLES, SPOT_FACINGS, TEMPERATURE_UNITS, WATCH_KINDS } from "../domain/vocabulary";

const createdAt = () => timestamp({ withTimezone: true }).notNull().defaultNow();

export const users = pgTable("users", {
  id: serial().primaryKey(),
  email: text().notNull().unique(),
  name: text().notNull(),
  passwordHash: text().notNull(),
  isAdmin: boolean().notNull().default(false),
  temperatureUnit: text({ enum: TEMPERATURE_UNITS }).notNull().default("C"),
  createdAt: createdAt(),
});

export const sessions = pgTable(
  "sessions",
  {
    // sha-256 of the token in the cookie, hex; the token itself is never stored
    id: text().primaryKey(),
    userId: integer()
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.userId)],
);

// Failed sign-ins, per account and per address, for the rate limit.
export const signInFailures = pgTable(
  "sign_in_failures",
  {
    id: bigserial({ mode: "number" }).primaryKey(),
    key: text().notNull(),
    at: createdAt(),
  },
  (t) => [index().on(t.key, t.at)],
);

export const sites = pgTable("sites", {
  id: serial().primaryKey(),
  name: text().notNull(),
  latitude: doublePrecision().notNull(),
  longitude: doublePrecision().notNull(),
  timeZone: text().notNull(),
  createdAt: createdAt(),
});

export const roleEnum = pgEnum("site_role", ROLES);

export const memberships = pgTable(
  "memberships",
  {
    userId: integer()
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    role: roleEnum().notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.siteId] }), index().on(t.siteId)],
);

export const facingEnum = pgEnum("window_facing", SPOT_FACINGS);

/** What lights a spot: picks the lux → PPFD factor of its DLI (app/domain/climate/light.ts). */
export const lightSourceEnum = pgEnum("light_source", LIGHT_SOURCES);
/** A windowsill's glazing, for the cold-glass rule; null when not given. */
export const glazingEnum = pgEnum("glazing", GLAZINGS);

export const spots = pgTable(
  "spots",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    name: text().notNull(),
    indoor: boolean().notNull(),
    facing: facingEnum().notNull().default("none"),
    capacity: integer().notNull().default(0),
    notes: text().notNull().default(""),
    lightSource: lightSourceEnum().notNull().default("sun"),
    glazing: glazingEnum(),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.siteId)],
);

export type Channel = "temperature" | "humidity" | "lux" | "battery";
export type Calibration = Partial<Record<"temperature" | "humidity" | "lux", number>>;

export const sensors = pgTable(
  "sensors",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    name: text().notNull(),
    // argon2id of the sensor's secret; the secret is shown once when the sensor is added
    secretHash: text().notNull(),
    channels: text()
      .array()
      .$type<Channel[]>()
      .notNull()
      .default(sql`'{temperature,humidity}'`),
    calibration: jsonb().$type<Calibration>().notNull().default({}),
    lastSeenAt: timestamp({ withTimezone: true }),
    battery: real(),
    rejectedCount: integer().notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.siteId)],
);

export const placements = pgTable(
  "placements",
  {
    id: serial().primaryKey(),
    sensorId: integer()
      .notNull()
      .references(() => sensors.id, { onDelete: "cascade" }),
    spotId: integer()
      .notNull()
      .references(() => spots.id, { onDelete: "cascade" }),
    fromAt: timestamp({ withTimezone: true }).notNull(),
    // null while the sensor is still there
    toAt: timestamp({ withTimezone: true }),
    // When the placement was made, which can be long after fromAt (a placement dated back): the
    // silent-sensor watch counts from it, not from fromAt.
    createdAt: createdAt(),
  },
  (t) => [index().on(t.sensorId, t.fromAt), index().on(t.spotId)],
);

// Raw readings exactly as received (calibration is applied when rolled up and shown).
export const readings = pgTable(
  "readings",
  {
    sensorId: integer().notNull(),
    measuredAt: timestamp({ withTimezone: true }).notNull(),
    temperature: real(),
    humidity: real(),
    lux: real(),
    battery: real(),
    receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.sensorId, t.measuredAt] })],
);

// Per spot and local hour (stored as the UTC instant the local hour starts), calibrated values.
export const hourlyRollups = pgTable(
  "hourly_rollups",
  {
    spotId: integer()
      .notNull()
      .references(() => spots.id, { onDelete: "cascade" }),
    hour: timestamp({ withTimezone: true }).notNull(),
    tN: integer().notNull().default(0),
    tMin: real(),
    tMax: real(),
    tSum: doublePrecision(),
    hN: integer().notNull().default(0),
    hMin: real(),
    hMax: real(),
    hSum: doublePrecision(),
    dpMarginMin: real(),
    // Readings with a dew-point margin, and those under 2 °C: the share of the hour spent near condensation.
    dpN: integer().notNull().default(0),
    dpUnderN: integer().notNull().default(0),
    luxN: integer().notNull().default(0),
    luxSum: doublePrecision(),
    /** The hour's highest lux reading: a run of hours at one ceiling is a sensor that clips. */
    luxMax: doublePrecision(),
  },
  (t) => [primaryKey({ columns: [t.spotId, t.hour] })],
);

// Spots whose past hours' rollups changed (late readings, a rebuild after a move or a calibration,
// deletions). Rows are written by statement triggers on hourly_rollups (drizzle/0004), so no path
// can forget; the rollup cache in app/.server/rollups/read.ts compares a spot's rows here to know when
// it must read the spot again. No foreign key: a deleted spot's rollups still log their deletion.
export const rollupChanges = pgTable(
  "rollup_changes",
  {
    id: bigserial({ mode: "number" }).primaryKey(),
    spotId: integer().notNull(),
    changedAt: createdAt(),
  },
  (t) => [index().on(t.spotId, t.id)],
);

// Bounded (pruned to the newest rows) record of what ingest refused and why.
export const rejectedMessages = pgTable(
  "rejected_messages",
  {
    id: bigserial({ mode: "number" }).primaryKey(),
    at: createdAt(),
    sensorId: integer(),
    source: text({ enum: ["mqtt", "http", "csv"] }).notNull(),
    topic: text(),
    reason: text().notNull(),
    payload: text().notNull(),
  },
  (t) => [index().on(t.at), index().on(t.reason)],
);

// Site-specific plant profiles (the shipped library lives in app/domain/plants).
export const customPlants = pgTable(
  "custom_plants",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    key: text().notNull(),
    basedOn: text(),
    profile: jsonb().notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex().on(t.siteId, t.key)],
);

// Plants standing in a spot now (the inventory), by profile key.
export const spotPlants = pgTable(
  "spot_plants",
  {
    id: serial().primaryKey(),
    spotId: integer()
      .notNull()
      .references(() => spots.id, { onDelete: "cascade" }),
    plantKey: text().notNull(),
    nickname: text().notNull().default(""),
    pots: integer().notNull().default(1),
    addedAt: createdAt(),
  },
  (t) => [index().on(t.spotId)],
);

export const wishlist = pgTable(
  "wishlist",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    plantKey: text().notNull(),
    mustHave: boolean().notNull().default(false),
    pots: integer().notNull().default(1),
    addedAt: createdAt(),
  },
  (t) => [uniqueIndex().on(t.siteId, t.plantKey)],
);

export const alertKindEnum = pgEnum("alert_kind", WATCH_KINDS);

// A watch: what the grower set on a spot (kind, threshold, how long) and its streaming state.
export const watches = pgTable(
  "watches",
  {
    id: serial().primaryKey(),
    spotId: integer()
      .notNull()
      .references(() => spots.id, { onDelete: "cascade" }),
    kind: alertKindEnum().notNull(),
    threshold: real().notNull(),
    // minutes the condition must hold before an event opens
    durationMinutes: integer().notNull().default(15),
    // how far back past the threshold the value must come before the all-clear
    hysteresis: real().notNull().default(1),
    clearMinutes: integer().notNull().default(30),
    earlyWarning: boolean().notNull().default(false),
    paused: boolean().notNull().default(false),
    reason: text().notNull().default(""),
    // streaming state: when the condition started holding (null when it does not)
    pendingSince: timestamp({ withTimezone: true }),
    clearingSince: timestamp({ withTimezone: true }),
    warnedAt: timestamp({ withTimezone: true }),
    // the newest reading instant evaluated: older readings arriving later cannot move the state
    evaluatedTo: timestamp({ withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.spotId)],
);

export const alertEvents = pgTable(
  "alert_events",
  {
    id: serial().primaryKey(),
    ruleId: integer()
      .notNull()
      .references(() => watches.id, { onDelete: "cascade" }),
    spotId: integer()
      .notNull()
      .references(() => spots.id, { onDelete: "cascade" }),
    kind: alertKindEnum().notNull(),
    startedAt: timestamp({ withTimezone: true }).notNull(),
    endedAt: timestamp({ withTimezone: true }),
    peak: real(),
    acknowledgedBy: integer().references(() => users.id, { onDelete: "set null" }),
    acknowledgedAt: timestamp({ withTimezone: true }),
    notifiedAt: timestamp({ withTimezone: true }),
    clearNotifiedAt: timestamp({ withTimezone: true }),
  },
  (t) => [index().on(t.spotId, t.startedAt)],
);

export const waterChecks = pgTable(
  "water_checks",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    source: text().notNull(),
    checkedOn: timestamp({ withTimezone: true }).notNull(),
    ppm: real(),
    ph: real(),
    ec: real(),
    ecScale: real(),
    byUserId: integer().references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.siteId, t.checkedOn)],
);

export const notes = pgTable(
  "notes",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    spotId: integer().references(() => spots.id, { onDelete: "cascade" }),
    plantKey: text(),
    authorId: integer().references(() => users.id, { onDelete: "set null" }),
    body: text().notNull(),
    resolvedAt: timestamp({ withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.siteId)],
);

export const auditLog = pgTable(
  "audit_log",
  {
    id: bigserial({ mode: "number" }).primaryKey(),
    siteId: integer().references(() => sites.id, { onDelete: "cascade" }),
    actorId: integer().references(() => users.id, { onDelete: "set null" }),
    action: text().notNull(),
    detail: jsonb().notNull().default({}),
    at: createdAt(),
  },
  (t) => [index().on(t.siteId, t.at)],
);

export type User = typeof users.$inferSelect;
export type Site = typeof sites.$inferSelect;
export type Spot = typeof spots.$inferSelect;
export type Sensor = typeof sensors.$inferSelect;
export type Placement = typeof placements.$inferSelect;
export type Role = (typeof roleEnum.enumValues)[number];
export type Facing = (typeof facingEnum.enumValues)[number];
export type HourlyRollupRow = typeof hourlyRollups.$inferSelect;
export type Watch = typeof watches.$inferSelect;
export type AlertEvent = typeof alertEvents.$inferSelect;

// Which alerts a member wants by e-mail, per site. Cold-snap alerts ignore quiet hours.
export const alertPreferences = pgTable(
  "alert_preferences",
  {
    userId: integer()
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    email: boolean().notNull().default(true),
    kinds: text()
      .array()
      .notNull()
      .default(sql`'{cold,heat,dry,condensation,silent,battery}'`),
    quietFrom: integer(), // minute of the local day, null = no quiet hours
    quietTo: integer(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.siteId] })],
);

// Sent e-mails of alerts, one per event, member and kind of message, so a restart never sends twice.
export const alertDeliveries = pgTable(
  "alert_deliveries",
  {
    eventId: integer()
      .notNull()
      .references(() => alertEvents.id, { onDelete: "cascade" }),
    userId: integer()
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    message: text({ enum: ["open", "clear"] }).notNull(),
    sentAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.eventId, t.userId, t.message] })],
);

export const invitations = pgTable(
  "invitations",
  {
    id: serial().primaryKey(),
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    email: text().notNull(),
    role: roleEnum().notNull(),
    // sha-256 of the random token in the link; the link itself is only in the e-mail
    tokenHash: text().notNull().unique(),
    invitedBy: integer().references(() => users.id, { onDelete: "set null" }),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    acceptedAt: timestamp({ withTimezone: true }),
    acceptedBy: integer().references(() => users.id, { onDelete: "set null" }),
    revokedAt: timestamp({ withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index().on(t.siteId)],
);

// Outdoor weather of a site, one row per UTC day with 24 hourly values per column, in small
// integers: temperature in 0.1 °C, humidity and cloud in %, wind in 0.1 km/h, sun in W/m² (about
// 0.4 kB a day, 150 kB a site-year with its index). `forecast` rows are replaced by the archive's.
export const weatherDays = pgTable(
  "weather_days",
  {
    siteId: integer()
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    day: date({ mode: "string" }).notNull(),
    temperature: smallint().array().notNull(),
    humidity: smallint().array().notNull(),
    cloud: smallint().array().notNull(),
    wind: smallint().array().notNull(),
    shortwave: smallint().array().notNull(),
    forecast: boolean().notNull().default(false),
  },
  (t) => [primaryKey({ columns: [t.siteId, t.day] })],
);

// Where a site's weather fetch stands: the place it was fetched for (a moved site starts again),
// the archive's stored span, the last forecast, and the back-off after failures.
export const weatherFetches = pgTable("weather_fetches", {
  siteId: integer()
    .primaryKey()
    .references(() => sites.id, { onDelete: "cascade" }),
  latitude: doublePrecision().notNull(),
  longitude: doublePrecision().notNull(),
  archiveFrom: date({ mode: "string" }),
  archiveTo: date({ mode: "string" }),
  forecastAt: timestamp({ withTimezone: true }),
  failures: integer().notNull().default(0),
  nextAttemptAt: timestamp({ withTimezone: true }),
  lastError: text(),
});

// Forecast warnings (issue 16, part 6): one row per spot and night whose forecast low is likely to
// cross the most tender placed plant's damage line 12–48 h ahead. `notified_at` and
// `clear_notified_at` are claimed before the e-mails go, so a night warns once per forecast event;
// a night that crosses again after its all-clear reopens the same row as a new event.
export const forecastWarnings = pgTable(
  "forecast_warnings",
  {
    id: serial().primaryKey(),
    spotId: integer()
      .notNull()
      .references(() => spots.id, { onDelete: "cascade" }),
    /** The local date the night starts on. */
    night: date({ mode: "string" }).notNull(),
    plantName: text().notNull(),
    damageC: real().notNull(),
    /** The figure compared with the line: the 80 % lower bound, or the leaves' low on a clear still night. */
    likelyC: real().notNull(),
    expectedLowC: real().notNull(),
    lowerBoundC: real().notNull(),
    leafLowC: real(),
    lowAt: timestamp({ withTimezone: true }).notNull(),
    forecastAt: timestamp({ withTimezone: true }),
    openedAt: timestamp({ withTimezone: true }).notNull(),
    notifiedAt: timestamp({ withTimezone: true }),
    clearedAt: timestamp({ withTimezone: true }),
    clearNotifiedAt: timestamp({ withTimezone: true }),
    /** The night has passed (or its plants left): no longer shown, no all-clear. */
    endedAt: timestamp({ withTimezone: true }),
  },
  (t) => [uniqueIndex().on(t.spotId, t.night)],
);

// Bridge mode (issue 19): a site's connection, as an MQTT client, to a broker the grower already
// runs, and the topics (or devices inside a shared topic) attached to the site's sensors. The
// password is kept so the bridge can reconnect, and never sent back to a page.
export const bridges = pgTable("bridges", {
  id: serial().primaryKey(),
  siteId: integer()
    .notNull()
    .unique()
    .references(() => sites.id, { onDelete: "cascade" }),
  url: text().notNull(),
  username: text(),
  password: text(),
  /** PEM of a private CA for mqtts://, or null for the system's. */
  caCert: text(),
  /** 4 (MQTT 3.1.1) or 5. */
  protocolVersion: smallint().notNull().default(4),
  /** Stable, so the broker keeps the session (and what was not acknowledged) across reconnects. */
  clientId: text().notNull(),
  enabled: boolean().notNull().default(true),
  createdAt: createdAt(),
  updatedAt: createdAt(),
});

export const bridgeLinks = pgTable(
  "bridge_links",
  {
    id: serial().primaryKey(),
    bridgeId: integer()
      .notNull()
      .references(() => bridges.id, { onDelete: "cascade" }),
    sensorId: integer()
      .notNull()
      .references(() => sensors.id, { onDelete: "cascade" }),
    topic: text().notNull(),
    /** The device inside a shared topic (a BLE address, a Tasmota sensor name), or '' for the whole topic. */
    device: text().notNull().default(""),
    /** How the messages are read: app/domain/payloads/presets.ts `Mapping`. */
    mapping: jsonb().$type<import("~/domain/payloads/presets").Mapping>().notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex().on(t.bridgeId, t.topic, t.device), index().on(t.sensorId)],
);
