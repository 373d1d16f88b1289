// The spot form (new spot, edit spot).
import { z } from "zod";
import { GLAZINGS, LIGHT_SOURCES, SPOT_FACINGS, SPOT_PLACES } from "~/domain/vocabulary";

export const spotSchema = z.object({
  name: z.string({ error: "Name the spot" }).trim().min(1, "Name the spot").max(80),
  indoor: z.enum(SPOT_PLACES, { error: "Is it indoors or outdoors?" }),
  facing: z.enum(SPOT_FACINGS, { error: "Choose the window facing, or no window" }),
  capacity: z
    .number({ error: "How many pots fit? (0 if you don't know yet)" })
    .int("Whole pots only")
    .min(0, "Can't be negative")
    .max(500, "That is more pots than we expect on one spot"),
  notes: z.string().trim().max(2000, "Keep notes under 2,000 characters").optional(),
  lightSource: z.enum(LIGHT_SOURCES, { error: "Choose what lights the spot" }).default("sun"),
  // Empty means not given; kept only for a spot by a window (see updateSpot).
  glazing: z.enum(GLAZINGS, { error: "Choose the glazing, or leave it not given" }).optional(),
});
