export type TemperatureCategory = "cool" | "intermediate" | "warm";

export type CoolPeriod = {
  /** Nights at or under this count towards the cue (absent: nights don't matter). */
  maxNightC?: number;
  /**
   * Extension beyond night temperature: some groups (Phalaenopsis) are cued by cool days, not
   * cool nights — Blanchard & Runkle (2006).
   */
  maxDayC?: number;
  weeks: number;
  months?: string; // in words, hemisphere-neutral: "late summer into autumn"
  /**
   * Months (1–12, northern hemisphere; shifted six months in the south) in which the cue counts:
   * a cool spell outside them comes too early or too late. Absent: any month.
   */
  cueMonths?: number[];
  /** The rest must be kept nearly dry (nobile Dendrobium, Pleione, Coelogyne cristata). */
  dryRest?: boolean;
};

export type PlantProfile = {
  key: string;
  name: string;
  group: "orchid" | "other";
  /** An orchid term: shown for orchids only (group "orchid"); kept on others for filters and own profiles. */
  category: TemperatureCategory;
  minNightC: number; // lowest comfortable night: the bottom of the comfort range
  maxDayC: number; // highest comfortable day: the top of the comfort range
  /** Cold damage line, °C: below it the plant is harmed (chilling or frost), not just slowed. Absent: minNightC − 4. */
  damageNightC?: number;
  /** Heat damage line, °C: above it the plant is harmed. Absent: maxDayC + 4. */
  damageDayC?: number;
  /** Highest comfortable night, °C, for cool growers: a season of warmer nights stops growth or flowering. */
  maxNightC?: number;
  humidityMin: number;
  humidityMax: number; // % band
  light: "low" | "medium" | "high";
  dliMin: number;
  dliMax: number; // mol m⁻² d⁻¹
  /** The day–night difference or cool period it needs to flower. */
  flowering: { difC?: number; coolPeriod?: CoolPeriod; note: string };
  coldTolerance: string; // plain words, e.g. "damaged below about 10 °C"
  summary: string; // one beginner-readable sentence
  sources: { field: string; source: string; memory?: boolean }[]; // every value with its source, or marked memory
};

/**
 * Orchid temperature categories by winter night minimum, as grower societies use them
 * (Frowine, Orchids for Dummies, table 2-1; American Orchid Society culture guidance):
 * cool 7–13 °C, intermediate 13–16 °C, warm 16–18 °C and above. Groups whose safe night is
 * under 13 °C count as cool; the band is the preferred winter night, not a hard limit.
 */
export const CATEGORY_NIGHTS: Record<TemperatureCategory, { fromC: number; toC: number | null }> = {
  cool: { fromC: 7, toC: 13 },
  intermediate: { fromC: 13, toC: 16 },
  warm: { fromC: 16, toC: null },
};

export function categoryForNight(minNightC: number): TemperatureCategory {
  if (minNightC < CATEGORY_NIGHTS.intermediate.fromC) return "cool";
  if (minNightC < CATEGORY_NIGHTS.warm.fromC) return "intermediate";
  return "warm";
}

type Source = PlantProfile["sources"][number];

const CATEGORY: Source = {
  field: "category",
  source: "Frowine, Orchids for Dummies, table 2-1, and AOS culture guidance: category from the lowest safe night",
};
const aos = (field: string, sheet: string, checked = false): Source => ({
  field,
  source: `American Orchid Society culture sheet, ${sheet}${checked ? " (wording checked against a published copy)" : ""}`,
  ...(checked ? {} : { memory: true }),
});
const rhs = (field: string, plant: string): Source => ({
  field,
  source: `RHS houseplant guidance, ${plant}`,
  memory: true,
});
const reid = (field = "coldTolerance"): Source => ({
  field,
  source: "Reid (1991), Acta Horticulturae 298: chilling injury of tropical foliage plants and flowers below 7–10 °C",
});
const dli = (note = "common practice"): Source => ({
  field: "dliMin/dliMax",
  source: `grower DLI bands for the light class (${note})`,
  memory: true,
});
const memo = (field: string, source: string): Source => ({ field, source, memory: true });

const BASE_LIBRARY: PlantProfile[] = [
  {
    key: "phalaenopsis",
    name: "Phalaenopsis (moth orchid)",
    group: "orchid",
    category: "warm",
    minNightC: 16,
    maxDayC: 29,
    humidityMin: 50,
    humidityMax: 80,
    light: "low",
    dliMin: 4,
    dliMax: 8,
    flowering: {
      coolPeriod: { maxDayC: 26, weeks: 4, months: "any time of year, usually autumn" },
      note:
        "Spikes are set by cooler days: spikes formed at 20/14 and " +
        "23/17 °C day/night and none at 29 °C days. A few weeks of days " +
        "under about 26 °C usually bring a spike.",
    },
    coldTolerance: "chilling damage below about 10 °C; keep nights above 15 °C",
    summary: "The easiest orchid for a warm room with bright light but no direct midday sun.",
    sources: [
      CATEGORY,
      aos("minNightC", "Phalaenopsis: nights above 60 °F (16 °C)", true),
      aos("maxDayC", "Phalaenopsis: days 75–85 °F (24–29 °C)", true),
      aos("humidityMin/humidityMax", "Phalaenopsis: 50–80 %", true),
      aos("light", "Phalaenopsis: bright window, little or no sun", true),
      dli(),
      {
        field: "flowering",
        source:
          "Blanchard & Runkle (2006), J. Exp. Bot. 57, 4043–4049: spiking " +
          "at 14–23 °C, 20/14 and 23/17 °C, none at 29 °C days; 26 °C is " +
          "our midpoint between tested temperatures",
      },
      memo("flowering.weeks", "weeks of cool days before a spike shows (memory)"),
      reid(),
    ],
  },
  {
    key: "paphiopedilum-mottled",
    name: "Paphiopedilum, mottled-leaf warm types (e.g. Maudiae)",
    group: "orchid",
    category: "warm",
    minNightC: 16,
    maxDayC: 29,
    humidityMin: 40,
    humidityMax: 70,
    light: "low",
    dliMin: 3,
    dliMax: 6,
    flowering: { note: "No temperature cue needed; flowers when mature and given steady warmth." },
    coldTolerance:
      "grows best with nights of 16 °C or more; a spell of nights under about 13 °C stops growth; a brief night near 10 °C is survived if kept dry",
    summary: "A slipper orchid for a warm, shaded windowsill that stays evenly moist.",
    sources: [
      CATEGORY,
      aos("minNightC", "Paphiopedilum: warm mottled-leaf types 60–65 °F (16–18 °C) at night", true),
      aos("maxDayC", "Paphiopedilum: days 75–80 °F or more, can stand 95 °F", true),
      aos("humidityMin/humidityMax", "Paphiopedilum: 40–60 % ideal; 70 % upper bound is ours", true),
      aos("light", "Paphiopedilum: shady east or west window", true),
      dli(),
      memo("flowering", "no temperature cue for mottled types (memory)"),
      memo(
        "coldTolerance",
        "AOS sheet: warm types want 60–65 °F nights; a brief cooler " +
          "night is survived (memory of the wording); the 13 °C growth " +
          "line and 10 °C damage line are ours",
      ),
    ],
  },
  {
    key: "paphiopedilum-complex",
    name: "Paphiopedilum, green-leaf cool types and complex hybrids",
    group: "orchid",
    category: "cool",
    minNightC: 10,
    maxDayC: 27,
    humidityMin: 40,
    humidityMax: 70,
    light: "low",
    dliMin: 4,
    dliMax: 8,
    flowering: {
      coolPeriod: { maxNightC: 13, weeks: 4, months: "autumn", cueMonths: [9, 10, 11] },
      note: "Cool autumn nights help the large complex hybrids set buds.",
    },
    coldTolerance: "takes nights near 7 °C; damaged by frost",
    summary: "A slipper orchid for a cool, bright but sunless room where winter nights drop to about 10–13 °C.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance: green-leaf types 50–60 °F (10–16 °C) at night (memory)"),
      memo("maxDayC", "AOS culture guidance: days 70–80 °F (21–27 °C) (memory)"),
      memo("humidityMin/humidityMax", "AOS culture guidance for Paphiopedilum (memory)"),
      memo("light", "AOS culture guidance: green-leaf types take a little more light than mottled (memory)"),
      dli(),
      memo("flowering", "common practice among growers of complex hybrids (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "cattleya",
    name: "Cattleya and hybrids",
    group: "orchid",
    category: "intermediate",
    minNightC: 13,
    maxDayC: 29,
    humidityMin: 50,
    humidityMax: 80,
    light: "high",
    dliMin: 12,
    dliMax: 20,
    flowering: { difC: 8, note: "Wants a clear drop from day to night, about 8–11 °C, to grow and flower well." },
    coldTolerance: "survives brief nights near 10 °C; damaged near 5 °C",
    summary: "The classic corsage orchid for a bright, sunny window with cooler nights.",
    sources: [
      CATEGORY,
      aos("minNightC", "Cattleya: 55–60 °F (13–16 °C) at night", true),
      aos("maxDayC", "Cattleya: 70–85 °F (21–29 °C) by day, more with shade and humidity", true),
      aos("humidityMin/humidityMax", "Cattleya: 50–80 %", true),
      aos("flowering", "Cattleya: 15–20 °F (8–11 °C) day–night differential", true),
      memo("light", "AOS culture guidance: strong light, some direct sun (memory)"),
      dli(),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "oncidium",
    name: "Oncidium alliance (Oncidium and its warm-tolerant hybrids)",
    group: "orchid",
    category: "intermediate",
    minNightC: 13,
    maxDayC: 29,
    humidityMin: 40,
    humidityMax: 70,
    light: "medium",
    dliMin: 8,
    dliMax: 15,
    flowering: { difC: 6, note: "A day–night drop of about 6–8 °C helps spikes form." },
    coldTolerance: "chilled below about 10 °C",
    summary: "Sprays of 'dancing lady' flowers for a bright east or west window.",
    sources: [
      CATEGORY,
      aos("minNightC", "Oncidium: nights 55–60 °F (13–16 °C)"),
      aos("maxDayC", "Oncidium: days 80–85 °F (27–29 °C)"),
      aos("humidityMin/humidityMax", "Oncidium"),
      aos("light", "Oncidium"),
      dli(),
      memo("flowering", "common practice"),
      reid(),
    ],
  },
  {
    key: "cymbidium",
    name: "Cymbidium (standard and miniature hybrids)",
    group: "orchid",
    category: "cool",
    minNightC: 7,
    maxDayC: 29,
    humidityMin: 40,
    humidityMax: 60,
    light: "high",
    dliMin: 15,
    dliMax: 30,
    flowering: {
      coolPeriod: { maxNightC: 13, weeks: 4, months: "late summer into autumn", cueMonths: [8, 9, 10, 11] },
      note: "Needs weeks of cool autumn nights (about 10–13 °C) to spike; in a room that never cools it grows but may not flower.",
    },
    coldTolerance: "takes nights near 2–4 °C without frost; frost kills",
    summary: "A big, bright-light orchid that grows outdoors in summer and needs cool autumn nights to flower.",
    sources: [
      CATEGORY,
      aos("minNightC", "Cymbidium: winter nights 45–55 °F (7–13 °C)", true),
      aos("maxDayC", "Cymbidium: summer days 75–85 °F (24–29 °C)", true),
      aos("humidityMin/humidityMax", "Cymbidium: 40–60 %", true),
      aos("flowering", "Cymbidium: late-summer to autumn nights 50–60 °F (10–16 °C) to initiate spikes", true),
      memo("flowering.weeks", "common practice: a cool period of at least a month"),
      aos("light", "Cymbidium: the most light possible short of burning", true),
      dli(),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "dendrobium-nobile",
    name: "Dendrobium, nobile type",
    group: "orchid",
    category: "cool",
    minNightC: 7,
    maxDayC: 30,
    humidityMin: 40,
    humidityMax: 60,
    light: "high",
    dliMin: 12,
    dliMax: 25,
    flowering: {
      coolPeriod: {
        maxNightC: 10,
        weeks: 4,
        months: "autumn to early winter, kept nearly dry",
        cueMonths: [10, 11, 12, 1],
        dryRest: true,
      },
      note: "Needs a cool, dry winter rest (nights about 10 °C or a little below) to flower; kept warm and wet it makes plantlets instead.",
    },
    coldTolerance: "takes nights near 5 °C when dry; frost kills",
    summary: "Cane orchid for a bright, cool spot that can be left dry and cold through early winter.",
    sources: [
      CATEGORY,
      {
        field: "minNightC",
        source:
          "Marie Selby Botanical Gardens, 'Dendrobium – Nobile Type': lows of 50–55 °F in growth, 50 °F or a little below at rest; 7 °C is ours",
      },
      {
        field: "maxDayC",
        source: "Marie Selby Botanical Gardens, 'Dendrobium – Nobile Type': tolerates 85 °F or higher",
      },
      {
        field: "humidityMin/humidityMax",
        source: "Marie Selby Botanical Gardens: 50–60 % ideal; 40 % lower bound is ours",
      },
      {
        field: "flowering",
        source:
          "Marie Selby Botanical Gardens: cool (50 °F) and dry after growth; nursery guidance: under 50 °F at night for a month",
      },
      memo("light", "common practice: bright, some direct sun"),
      dli(),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "dendrobium-phalaenanthe",
    name: "Dendrobium, phalaenopsis type (warm)",
    group: "orchid",
    category: "warm",
    minNightC: 16,
    maxDayC: 32,
    humidityMin: 50,
    humidityMax: 80,
    light: "high",
    dliMin: 12,
    dliMax: 20,
    flowering: { note: "No cool rest needed; flowers from new canes in warm, bright conditions." },
    coldTolerance: "drops leaves below about 13 °C; damaged below 10 °C",
    summary: "A warm, sun-loving cane orchid for a hot bright window — never a cold one.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance for Dendrobium, phalaenopsis type (memory)"),
      memo("maxDayC", "AOS culture guidance (memory)"),
      memo("humidityMin/humidityMax", "AOS culture guidance (memory)"),
      memo("light", "AOS culture guidance (memory)"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      reid(),
    ],
  },
  {
    key: "vanda",
    name: "Vanda and Ascocenda",
    group: "orchid",
    category: "warm",
    minNightC: 16,
    maxDayC: 32,
    humidityMin: 60,
    humidityMax: 85,
    light: "high",
    dliMin: 15,
    dliMax: 30,
    flowering: { note: "Flowering depends on strong light more than on a temperature cue." },
    coldTolerance: "damaged below about 10 °C; loses leaves after cold nights",
    summary: "A warm, very bright, very humid grower — hard on a windowsill, easier in a sunroom.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance for Vanda: nights 60–65 °F (memory)"),
      memo("maxDayC", "AOS culture guidance: days to 95 °F with humidity (memory)"),
      memo("humidityMin/humidityMax", "AOS culture guidance: about 80 % (memory)"),
      {
        field: "light",
        source: "New York Botanical Garden, Vanda guide: about 3,500–4,000 foot-candles, south window",
      },
      dli(),
      memo("flowering", "grower experience (memory)"),
      reid(),
    ],
  },
  {
    key: "miltoniopsis",
    name: "Miltoniopsis (pansy orchid)",
    group: "orchid",
    category: "cool",
    minNightC: 10,
    maxDayC: 26,
    humidityMin: 50,
    humidityMax: 70,
    light: "low",
    dliMin: 4,
    dliMax: 8,
    flowering: { note: "Flowers after cool nights; long spells above about 27 °C stop growth." },
    coldTolerance: "takes a brief 7 °C; heat is the bigger risk",
    summary: "A fragrant 'pansy' orchid for a cool, shaded, humid room that never gets hot.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance for Miltoniopsis: cool nights about 10–13 °C (memory)"),
      memo("maxDayC", "AOS culture guidance: days 70–75 °F, suffers above 80 °F (memory)"),
      aos("humidityMin/humidityMax", "Miltoniopsis"),
      aos("light", "Miltoniopsis"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "masdevallia",
    name: "Masdevallia",
    group: "orchid",
    category: "cool",
    minNightC: 8,
    maxDayC: 24,
    humidityMin: 70,
    humidityMax: 90,
    light: "low",
    dliMin: 3,
    dliMax: 7,
    flowering: { note: "Needs steady coolness more than a cue; warm nights stop flowering." },
    coldTolerance: "most take nights near 5 °C; heat above about 27 °C kills them first",
    summary: "A cloud-forest miniature for a cool, very humid, shaded place such as a terrarium in a cool room.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance for cool-growing pleurothallids (memory)"),
      memo("maxDayC", "AOS culture guidance (memory)"),
      memo("humidityMin/humidityMax", "AOS culture guidance: high humidity (memory)"),
      memo("light", "AOS culture guidance: shade (memory)"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "zygopetalum",
    name: "Zygopetalum",
    group: "orchid",
    category: "cool",
    minNightC: 10,
    maxDayC: 29,
    humidityMin: 40,
    humidityMax: 70,
    light: "medium",
    dliMin: 8,
    dliMax: 14,
    flowering: { difC: 8, note: "A day–night drop of about 8 °C in autumn helps it flower." },
    coldTolerance: "tolerates nights near 7 °C",
    summary: "A fragrant, sturdy orchid for a bright, cool-to-moderate room with cool nights.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance for Zygopetalum: nights 50–55 °F (memory)"),
      memo("maxDayC", "AOS culture guidance (memory)"),
      memo("humidityMin/humidityMax", "AOS culture guidance (memory)"),
      memo("light", "AOS culture guidance (memory)"),
      dli(),
      memo("flowering", "common practice"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "coelogyne-cristata",
    name: "Coelogyne cristata",
    group: "orchid",
    category: "cool",
    minNightC: 5,
    maxDayC: 27,
    humidityMin: 40,
    humidityMax: 70,
    light: "medium",
    dliMin: 8,
    dliMax: 15,
    flowering: {
      coolPeriod: {
        maxNightC: 10,
        weeks: 6,
        months: "winter, kept on the dry side",
        cueMonths: [11, 12, 1, 2],
        dryRest: true,
      },
      note: "Needs a cold, fairly dry winter (nights about 5–10 °C) to flower.",
    },
    coldTolerance: "takes nights near 3–5 °C when dry; frost kills",
    summary: "A white-flowered Himalayan orchid for a cold, bright porch or unheated room in winter.",
    sources: [
      CATEGORY,
      memo("minNightC", "grower guidance for Himalayan Coelogyne (memory)"),
      memo("maxDayC", "grower guidance (memory)"),
      memo("humidityMin/humidityMax", "grower guidance (memory)"),
      memo("light", "grower guidance (memory)"),
      dli(),
      memo("flowering", "grower guidance: cold dry winter rest (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "ludisia",
    name: "Ludisia discolor (jewel orchid)",
    group: "orchid",
    category: "intermediate",
    minNightC: 14,
    maxDayC: 29,
    humidityMin: 50,
    humidityMax: 80,
    light: "low",
    dliMin: 2,
    dliMax: 5,
    flowering: { note: "Flowers in winter without a special cue." },
    coldTolerance: "chilled below about 10 °C",
    summary: "A jewel orchid grown for its leaves, happy in low light on a warm shelf.",
    sources: [
      CATEGORY,
      memo("minNightC", "grower guidance for jewel orchids (memory)"),
      memo("maxDayC", "grower guidance (memory)"),
      memo("humidityMin/humidityMax", "grower guidance (memory)"),
      memo("light", "grower guidance: low light (memory)"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      reid(),
    ],
  },
  {
    key: "pleione",
    name: "Pleione",
    group: "orchid",
    category: "cool",
    minNightC: 1,
    maxDayC: 25,
    humidityMin: 50,
    humidityMax: 70,
    light: "medium",
    dliMin: 8,
    dliMax: 14,
    flowering: {
      coolPeriod: {
        maxNightC: 5,
        weeks: 10,
        months: "winter dormancy, bulbs kept dry",
        cueMonths: [11, 12, 1, 2, 3],
        dryRest: true,
      },
      note: "Needs a cold, dry winter dormancy just above freezing to flower in spring.",
    },
    coldTolerance: "dormant bulbs take 1–5 °C; hard frost kills",
    summary: "A near-hardy orchid for a cold, frost-free windowsill or greenhouse — not for a heated room.",
    sources: [
      CATEGORY,
      memo("minNightC", "grower guidance for Pleione: frost-free cold dormancy (memory)"),
      memo("maxDayC", "grower guidance (memory)"),
      memo("humidityMin/humidityMax", "grower guidance (memory)"),
      memo("light", "grower guidance (memory)"),
      dli(),
      memo("flowering", "grower guidance (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "encyclia-prosthechea",
    name: "Encyclia and Prosthechea",
    group: "orchid",
    category: "intermediate",
    minNightC: 13,
    maxDayC: 30,
    humidityMin: 40,
    humidityMax: 70,
    light: "medium",
    dliMin: 10,
    dliMax: 15,
    flowering: { difC: 8, note: "Likes a clear day–night drop, as its Cattleya relatives do." },
    coldTolerance: "tolerates about 10 °C",
    summary: "Tough Cattleya relatives for a bright window, forgiving of dry spells.",
    sources: [
      CATEGORY,
      memo("minNightC", "AOS culture guidance for Encyclia (memory)"),
      memo("maxDayC", "AOS culture guidance (memory)"),
      memo("humidityMin/humidityMax", "AOS culture guidance (memory)"),
      memo("light", "AOS culture guidance (memory)"),
      dli(),
      memo("flowering", "common practice"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "brassavola",
    name: "Brassavola (e.g. B. nodosa)",
    group: "orchid",
    category: "intermediate",
    minNightC: 14,
    maxDayC: 32,
    humidityMin: 40,
    humidityMax: 70,
    light: "high",
    dliMin: 12,
    dliMax: 22,
    flowering: { note: "Flowers with strong light; no temperature cue needed." },
    coldTolerance: "chilled below about 10 °C",
    summary: "A night-scented, sun-loving orchid that shrugs off heat and dry air.",
    sources: [
      CATEGORY,
      memo("minNightC", "grower guidance for Brassavola (memory)"),
      memo("maxDayC", "grower guidance (memory)"),
      memo("humidityMin/humidityMax", "grower guidance (memory)"),
      memo("light", "grower guidance (memory)"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      reid(),
    ],
  },
  {
    key: "neofinetia",
    name: "Neofinetia / Vanda falcata",
    group: "orchid",
    category: "cool",
    minNightC: 5,
    maxDayC: 32,
    humidityMin: 50,
    humidityMax: 80,
    light: "medium",
    dliMin: 8,
    dliMax: 14,
    flowering: {
      coolPeriod: { maxNightC: 12, weeks: 6, months: "winter rest", cueMonths: [11, 12, 1, 2] },
      note: "A cool winter rest (nights about 5–12 °C) brings summer flowers.",
    },
    coldTolerance: "winter rest near 5–10 °C; a brief 3 °C is survivable",
    summary: "A small, fragrant Japanese orchid that needs a cool winter and warm, humid summer.",
    sources: [
      CATEGORY,
      memo("minNightC", "grower guidance for Neofinetia (memory)"),
      memo("maxDayC", "grower guidance (memory)"),
      memo("humidityMin/humidityMax", "grower guidance (memory)"),
      memo("light", "grower guidance (memory)"),
      dli(),
      memo("flowering", "grower guidance (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "tillandsia",
    name: "Tillandsia (air plants, grey-leaved)",
    group: "other",
    category: "cool",
    minNightC: 10,
    maxDayC: 32,
    humidityMin: 40,
    humidityMax: 70,
    light: "high",
    dliMin: 10,
    dliMax: 20,
    flowering: { note: "Flowers once at maturity; no temperature cue." },
    coldTolerance: "damaged below about 5 °C; keep above 10 °C",
    summary: "Rootless air plants for a bright, airy spot; they need light and drying air between soakings.",
    sources: [
      CATEGORY,
      memo("minNightC", "RHS-style houseplant guidance for Tillandsia (memory)"),
      memo("maxDayC", "grower guidance (memory)"),
      memo("humidityMin/humidityMax", "grower guidance (memory)"),
      memo("light", "grower guidance (memory)"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "anthurium",
    name: "Anthurium andraeanum (flamingo flower)",
    group: "other",
    category: "warm",
    minNightC: 16,
    maxDayC: 29,
    humidityMin: 60,
    humidityMax: 80,
    light: "medium",
    dliMin: 5,
    dliMax: 10,
    flowering: { note: "Flowers all year in steady warmth and bright, indirect light." },
    coldTolerance: "flowers and leaves suffer chilling injury below about 10–12 °C",
    summary: "A glossy, long-flowering aroid for a warm, humid, bright room out of direct sun.",
    sources: [
      CATEGORY,
      rhs("minNightC", "Anthurium: minimum about 15–16 °C"),
      rhs("maxDayC", "Anthurium"),
      rhs("humidityMin/humidityMax", "Anthurium: high humidity"),
      rhs("light", "Anthurium: bright, indirect light"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      reid(),
    ],
  },
  {
    key: "begonia-rex",
    name: "Begonia Rex Cultorum group",
    group: "other",
    category: "intermediate",
    minNightC: 13,
    maxDayC: 27,
    humidityMin: 50,
    humidityMax: 70,
    light: "low",
    dliMin: 3,
    dliMax: 6,
    flowering: { note: "Grown for its leaves; no flowering cue matters." },
    coldTolerance: "leaves damaged below about 10 °C",
    summary: "A patterned-leaf begonia for a bright, sunless shelf with humid air.",
    sources: [
      CATEGORY,
      rhs("minNightC", "Begonia rex: minimum about 13–15 °C"),
      rhs("maxDayC", "Begonia rex"),
      rhs("humidityMin/humidityMax", "Begonia rex"),
      rhs("light", "Begonia rex: bright but indirect"),
      dli(),
      memo("flowering", "foliage plant (memory)"),
      reid(),
    ],
  },
  {
    key: "hoya",
    name: "Hoya (wax plant, e.g. H. carnosa)",
    group: "other",
    category: "cool",
    minNightC: 10,
    maxDayC: 32,
    humidityMin: 40,
    humidityMax: 70,
    light: "medium",
    dliMin: 6,
    dliMax: 14,
    flowering: {
      coolPeriod: { maxNightC: 15, weeks: 6, months: "winter", cueMonths: [11, 12, 1, 2] },
      note: "A cooler, drier winter and bright light help it flower; leave the old flower spurs on.",
    },
    coldTolerance: "damaged below about 7 °C",
    summary: "A trailing wax plant for a bright window that can be a little cooler in winter.",
    sources: [
      CATEGORY,
      rhs("minNightC", "Hoya carnosa: minimum about 10 °C"),
      rhs("maxDayC", "Hoya"),
      rhs("humidityMin/humidityMax", "Hoya"),
      rhs("light", "Hoya: bright, some sun"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "nepenthes-highland",
    name: "Nepenthes, highland species and hybrids",
    group: "other",
    category: "cool",
    minNightC: 10,
    maxDayC: 27,
    humidityMin: 60,
    humidityMax: 90,
    light: "medium",
    dliMin: 8,
    dliMax: 14,
    flowering: {
      difC: 8,
      note: "Needs a clear night drop (about 8–10 °C) to stay healthy and keep making pitchers.",
    },
    coldTolerance: "takes a brief 5–7 °C; warm nights weaken it",
    summary: "A pitcher plant for a humid, bright place whose nights turn cool.",
    sources: [
      CATEGORY,
      memo("minNightC", "carnivorous-plant society guidance for highland Nepenthes (memory)"),
      memo("maxDayC", "carnivorous-plant society guidance (memory)"),
      memo("humidityMin/humidityMax", "carnivorous-plant society guidance (memory)"),
      memo("light", "carnivorous-plant society guidance (memory)"),
      dli(),
      memo("flowering", "carnivorous-plant society guidance: highland night drop (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "nepenthes-lowland",
    name: "Nepenthes, lowland species and hybrids",
    group: "other",
    category: "warm",
    minNightC: 18,
    maxDayC: 35,
    humidityMin: 70,
    humidityMax: 90,
    light: "medium",
    dliMin: 8,
    dliMax: 14,
    flowering: { note: "No temperature cue; wants steady heat and humidity." },
    coldTolerance: "damaged below about 13 °C",
    summary: "A pitcher plant for steady heat and very humid air, such as a warm terrarium.",
    sources: [
      CATEGORY,
      memo("minNightC", "carnivorous-plant society guidance for lowland Nepenthes (memory)"),
      memo("maxDayC", "carnivorous-plant society guidance (memory)"),
      memo("humidityMin/humidityMax", "carnivorous-plant society guidance (memory)"),
      memo("light", "carnivorous-plant society guidance (memory)"),
      dli(),
      memo("flowering", "grower experience (memory)"),
      memo("coldTolerance", "grower experience (memory)"),
    ],
  },
  {
    key: "calathea",
    name: "Calathea / Goeppertia (prayer plant)",
    group: "other",
    category: "warm",
    minNightC: 16,
    maxDayC: 27,
    humidityMin: 60,
    humidityMax: 80,
    light: "low",
    dliMin: 2,
    dliMax: 5,
    flowering: { note: "Grown for its leaves; no flowering cue matters." },
    coldTolerance: "leaves curl and mark below about 13–15 °C; chilling injury below 10 °C",
    summary: "A patterned-leaf plant for a warm, humid, shaded room away from draughts.",
    sources: [
      CATEGORY,
      rhs("minNightC", "Calathea: minimum about 16 °C"),
      rhs("maxDayC", "Calathea"),
      rhs("humidityMin/humidityMax", "Calathea: high humidity"),
      rhs("light", "Calathea: shade from direct sun"),
      dli(),
      memo("flowering", "foliage plant (memory)"),
      reid(),
    ],
  },
];

const ODONTOGLOSSUM: PlantProfile = {
  key: "odontoglossum",
  name: "Odontoglossum and cool Oncidium-alliance hybrids",
  group: "orchid",
  category: "cool",
  minNightC: 10,
  maxDayC: 24,
  humidityMin: 50,
  humidityMax: 80,
  light: "medium",
  dliMin: 6,
  dliMax: 12,
  flowering: { note: "No firm cue; flowers on mature growths when kept cool and evenly moist." },
  coldTolerance: "takes nights near 7 °C; damaged near 4 °C; summer heat over about 29 °C is the real risk",
  summary: "A cloud-forest orchid with showy sprays for a cool, bright, airy room that stays under about 24 °C.",
  sources: [
    CATEGORY,
    memo("minNightC", "AOS culture guidance for Odontoglossum: cool nights 50–55 °F (10–13 °C) (memory)"),
    memo("maxDayC", "AOS culture guidance for Odontoglossum: days 70–75 °F (21–24 °C) (memory)"),
    memo("humidityMin/humidityMax", "AOS culture guidance for Odontoglossum (memory)"),
    memo("light", "AOS culture guidance: bright shade, as for Oncidium (memory)"),
    memo("dliMin/dliMax", "from memory"),
    memo("flowering", "grower experience (memory)"),
    memo("coldTolerance", "grower experience (memory)"),
  ],
};

/**
 * DLI bands per light class, mol m⁻² d⁻¹ (*memory*, common practice among growers under lights):
 * each group's own range lies inside its class band; the group's range is from memory.
 */
export const DLI_BANDS: Record<PlantProfile["light"], { min: number; max: number }> = {
  low: { min: 2, max: 8 },
  medium: { min: 5, max: 15 },
  high: { min: 10, max: 30 },
};

type Limits = { damageNightC: number; damageDayC: number; maxNightC?: number; source: string; memory?: boolean };
/**
 * Damage lines and maximum nights. Cold damage lines follow each group's cold tolerance above and
 * Reid (1991) for chilling-sensitive tropicals (7–10 °C); heat lines and maximum nights are from
 * memory of culture guidance unless named.
 */
const LIMITS: Record<string, Limits> = {
  phalaenopsis: {
    damageNightC: 10,
    damageDayC: 35,
    source: "cold: Reid (1991) chilling below 10 °C; heat 35 °C: AOS 'can stand 95 °F' for warm growers (memory)",
    memory: true,
  },
  "paphiopedilum-mottled": {
    damageNightC: 10,
    damageDayC: 35,
    source: "AOS: can stand 95 °F; cold line ours from the sheet's brief cool night (memory)",
    memory: true,
  },
  "paphiopedilum-complex": {
    damageNightC: 4,
    damageDayC: 35,
    source:
      "AOS Paphiopedilum sheet: can stand 95 °F (memory of the wording); cold line from grower experience (memory)",
    memory: true,
  },
  cattleya: {
    damageNightC: 5,
    damageDayC: 35,
    source: "cold tolerance above; heat from AOS 'more with shade and humidity' (memory)",
    memory: true,
  },
  oncidium: { damageNightC: 8, damageDayC: 35, source: "grower experience (memory)", memory: true },
  cymbidium: {
    damageNightC: 2,
    damageDayC: 35,
    source: "AOS Cymbidium sheet: takes nights near 35–40 °F without frost (memory of the wording)",
    memory: true,
  },
  "dendrobium-nobile": { damageNightC: 3, damageDayC: 35, source: "grower experience (memory)", memory: true },
  "dendrobium-phalaenanthe": {
    damageNightC: 10,
    damageDayC: 38,
    source: "cold tolerance above; heat from memory",
    memory: true,
  },
  vanda: {
    damageNightC: 10,
    damageDayC: 38,
    source: "Reid (1991) chilling below 10 °C; heat from memory",
    memory: true,
  },
  miltoniopsis: {
    damageNightC: 5,
    damageDayC: 29,
    maxNightC: 17,
    source: "AOS guidance: suffers above 80 °F (memory)",
    memory: true,
  },
  masdevallia: {
    damageNightC: 3,
    damageDayC: 27,
    maxNightC: 16,
    source: "profile above: heat above about 27 °C kills; warm nights (18–20 °C) stop flowering (memory)",
    memory: true,
  },
  odontoglossum: { damageNightC: 4, damageDayC: 29, maxNightC: 16, source: "grower experience (memory)", memory: true },
  zygopetalum: { damageNightC: 4, damageDayC: 33, source: "grower experience (memory)", memory: true },
  "coelogyne-cristata": { damageNightC: 1, damageDayC: 32, source: "cold tolerance above (memory)", memory: true },
  ludisia: { damageNightC: 10, damageDayC: 35, source: "Reid (1991); heat from memory", memory: true },
  pleione: {
    damageNightC: -3,
    damageDayC: 30,
    maxNightC: 18,
    source: "grower experience: light frost on dry bulbs survived, hard frost kills (memory)",
    memory: true,
  },
  "encyclia-prosthechea": { damageNightC: 7, damageDayC: 35, source: "grower experience (memory)", memory: true },
  brassavola: { damageNightC: 10, damageDayC: 38, source: "cold tolerance above; heat from memory", memory: true },
  neofinetia: { damageNightC: 2, damageDayC: 36, source: "cold tolerance above (memory)", memory: true },
  tillandsia: { damageNightC: 5, damageDayC: 38, source: "cold tolerance above (memory)", memory: true },
  anthurium: { damageNightC: 10, damageDayC: 35, source: "Reid (1991) chilling; heat from memory", memory: true },
  "begonia-rex": {
    damageNightC: 8,
    damageDayC: 35,
    source: "RHS guidance and grower experience (memory)",
    memory: true,
  },
  hoya: { damageNightC: 5, damageDayC: 38, source: "grower experience (memory)", memory: true },
  "nepenthes-highland": {
    damageNightC: 3,
    damageDayC: 30,
    maxNightC: 18,
    source: "carnivorous-plant society guidance: highlands want a night drop (memory)",
    memory: true,
  },
  "nepenthes-lowland": { damageNightC: 13, damageDayC: 40, source: "cold tolerance above (memory)", memory: true },
  calathea: {
    damageNightC: 10,
    damageDayC: 35,
    source: "Reid (1991) chilling below 10 °C; heat from memory",
    memory: true,
  },
};

export const PLANT_LIBRARY: PlantProfile[] = [...BASE_LIBRARY, ODONTOGLOSSUM].map((p) => {
  const l = LIMITS[p.key];
  const band = DLI_BANDS[p.light];
  const sources = p.sources.map((s) =>
    s.field === "dliMin/dliMax"
      ? {
          field: s.field,
          source: `group range from memory, inside the ${p.light}-light class band ${band.min}–${band.max} mol m⁻² d⁻¹ (common practice)`,
          memory: true,
        }
      : s,
  );
  if (!l) return { ...p, sources };
  return {
    ...p,
    damageNightC: l.damageNightC,
    damageDayC: l.damageDayC,
    ...(l.maxNightC !== undefined ? { maxNightC: l.maxNightC } : {}),
    sources: [
      ...sources,
      { field: "damageNightC/damageDayC/maxNightC", source: l.source, ...(l.memory ? { memory: true } : {}) },
    ],
  };
});

export function plantByKey(key: string): PlantProfile | undefined {
  return PLANT_LIBRARY.find((p) => p.key === key);
}

/** The fields every profile must name a source for (or mark as memory). */
export const SOURCED_FIELDS = [
  "category",
  "minNightC",
  "maxDayC",
  "humidityMin/humidityMax",
  "light",
  "dliMin/dliMax",
  "flowering",
  "coldTolerance",
] as const;
