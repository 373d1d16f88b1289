// A grower's own plant profile: the form schema (browser and action) and the stored shape (custom_plants.profile).
import { z } from "zod";
import { categoryForNight, type PlantProfile } from "~/domain/plants/library";

const temp = (what: string) =>
  z
    .number({ error: `Enter ${what}` })
    .min(-30, "That is colder than any plant here takes")
    .max(60, "That is hotter than any plant here takes");

/** Temperatures are typed in the grower's unit and converted in the action. */
export const plantFormSchema = z
  .object({
    name: z.string({ error: "Name the plant or group" }).trim().min(1, "Name the plant or group").max(80),
    basedOn: z.string().max(80).optional(),
    group: z.enum(["orchid", "other"], { error: "Orchid or other?" }),
    minNightC: temp("the lowest safe night"),
    maxDayC: temp("the highest comfortable day"),
    humidityMin: z.number({ error: "Enter the lowest humidity it likes" }).min(0, "0–100 %").max(100, "0–100 %"),
    humidityMax: z.number({ error: "Enter the highest humidity it likes" }).min(0, "0–100 %").max(100, "0–100 %"),
    light: z.enum(["low", "medium", "high"], { error: "Choose a light level" }),
    dliMin: z
      .number({ error: "Enter the lowest daily light" })
      .min(0, "Can't be negative")
      .max(60, "Up to 60 mol m⁻² d⁻¹"),
    dliMax: z
      .number({ error: "Enter the highest daily light" })
      .min(0, "Can't be negative")
      .max(60, "Up to 60 mol m⁻² d⁻¹"),
    difC: z.number().min(0, "Can't be negative").max(20, "Up to 20 degrees").optional(),
    coolNightC: temp("the cool-period night").optional(),
    coolWeeks: z.number().int("Whole weeks").min(1, "At least a week").max(20, "Up to 20 weeks").optional(),
    floweringNote: z.string().trim().max(400).optional(),
    coldTolerance: z.string({ error: "Say how it takes the cold" }).trim().min(1, "Say how it takes the cold").max(200),
    summary: z.string().trim().max(300).optional(),
    source: z.string().trim().max(300).optional(),
  })
  .refine((v) => v.minNightC < v.maxDayC, {
    path: ["maxDayC"],
    message: "The highest day must be warmer than the lowest night",
  })
  .refine((v) => v.humidityMin <= v.humidityMax, {
    path: ["humidityMax"],
    message: "The highest humidity must be at least the lowest",
  })
  .refine((v) => v.dliMin <= v.dliMax, {
    path: ["dliMax"],
    message: "The highest daily light must be at least the lowest",
  })
  .refine((v) => (v.coolNightC === undefined) === (v.coolWeeks === undefined), {
    path: ["coolWeeks"],
    message: "A cool period needs both its night temperature and how many weeks",
  });
export type PlantForm = z.infer<typeof plantFormSchema>;

/** What a stored profile must look like to be used; rows that fail are left out rather than crash a page. */
export const storedProfileSchema = z.object({
  key: z.string(),
  name: z.string(),
  group: z.enum(["orchid", "other"]),
  category: z.enum(["cool", "intermediate", "warm"]),
  minNightC: z.number(),
  maxDayC: z.number(),
  humidityMin: z.number(),
  humidityMax: z.number(),
  light: z.enum(["low", "medium", "high"]),
  dliMin: z.number(),
  dliMax: z.number(),
  flowering: z.object({
    difC: z.number().optional(),
    coolPeriod: z
      .object({
        maxNightC: z.number(),
        maxDayC: z.number().optional(),
        weeks: z.number(),
        months: z.string().optional(),
      })
      .optional(),
    note: z.string(),
  }),
  coldTolerance: z.string(),
  summary: z.string(),
  sources: z.array(z.object({ field: z.string(), source: z.string(), memory: z.boolean().optional() })),
});

export function slugOf(name: string) {
  return (
    name
      .toLowerCase()
      .normalize("NFKD")
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 50) || "plant"
  );
}

const FIELD_VALUES: Record<string, (p: Omit<PlantProfile, "sources" | "key">) => unknown> = {
  category: (p) => p.category,
  minNightC: (p) => p.minNightC,
  maxDayC: (p) => p.maxDayC,
  "humidityMin/humidityMax": (p) => `${p.humidityMin}/${p.humidityMax}`,
  light: (p) => p.light,
  "dliMin/dliMax": (p) => `${p.dliMin}/${p.dliMax}`,
  flowering: (p) =>
    JSON.stringify([p.flowering.difC, p.flowering.coolPeriod?.maxNightC, p.flowering.coolPeriod?.weeks]),
  coldTolerance: (p) => p.coldTolerance,
};

/**
 * The stored profile from the form (temperatures already in °C). Values kept from the library
 * profile it was copied from keep their sources; changed values are credited to the grower, with
 * the source they typed (or none).
 */
export function profileFromForm(key: string, v: PlantForm, base: PlantProfile | undefined): PlantProfile {
  const coolPeriod =
    v.coolNightC !== undefined && v.coolWeeks !== undefined
      ? {
          maxNightC: v.coolNightC,
          weeks: v.coolWeeks,
          ...(base?.flowering.coolPeriod?.maxDayC !== undefined && base.flowering.coolPeriod.maxNightC === v.coolNightC
            ? { maxDayC: base.flowering.coolPeriod.maxDayC }
            : {}),
          ...(base?.flowering.coolPeriod?.months ? { months: base.flowering.coolPeriod.months } : {}),
        }
      : undefined;
  const profile: Omit<PlantProfile, "sources" | "key"> = {
    name: v.name,
    group: v.group,
    category: categoryForNight(v.minNightC),
    minNightC: v.minNightC,
    maxDayC: v.maxDayC,
    humidityMin: v.humidityMin,
    humidityMax: v.humidityMax,
    light: v.light,
    dliMin: v.dliMin,
    dliMax: v.dliMax,
    flowering: {
      ...(v.difC !== undefined ? { difC: v.difC } : {}),
      ...(coolPeriod ? { coolPeriod } : {}),
      note: v.floweringNote ?? "",
    },
    coldTolerance: v.coldTolerance,
    summary: v.summary ?? "",
  };
  const own = v.source ? `your own value: ${v.source}` : "your own value (no source given)";
  const sources = Object.entries(FIELD_VALUES).map(([field, get]) => {
    const kept =
      base && get(base) === get(profile)
        ? base.sources.filter((s) => s.field === field || s.field.startsWith(`${field}.`))
        : [];
    return kept.length > 0
      ? kept
      : [
          {
            field,
            source: field === "category" ? "from the lowest safe night (Frowine, table 2-1)" : own,
            ...(v.source || field === "category" ? {} : { memory: true }),
          },
        ];
  });
  return { key, ...profile, sources: sources.flat() };
}
