// The plants standing in a spot: add one (with an optional name of its own), move one to another
// spot, remove one. The spot is the page's.
import { z } from "zod";
import { rowId, text } from "~/forms/fields";
import { plantKey, pots } from "~/forms/wishlist";

export const addPlantSchema = z.object({
  intent: z.literal("plant-add"),
  plantKey,
  nickname: text(60, "Keep the name under 60 characters")
    .optional()
    .transform((v) => v ?? ""),
  pots: pots.default(1),
});

export const inventorySchema = z.discriminatedUnion(
  "intent",
  [
    addPlantSchema,
    z.object({
      intent: z.literal("plant-move"),
      id: rowId("Choose a plant."),
      toSpotId: rowId("Choose the spot to move it to."),
    }),
    z.object({ intent: z.literal("plant-remove"), id: rowId("Choose a plant.") }),
  ],
  { error: "Unknown action" },
);
export type InventoryChange = z.output<typeof inventorySchema>;
