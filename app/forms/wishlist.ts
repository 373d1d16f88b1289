// Wishes: the wishlist page (add, change, remove, put back) and a plant's page (wish for it).
import { z } from "zod";
import { checkbox } from "~/forms/fields";

export const plantKey = z
  .string({ error: "Choose a plant" })
  .trim()
  .min(1, "Choose a plant")
  .max(120, "Choose a plant from the list.");
export const pots = z
  .number({ error: "Whole pots only" })
  .int("Whole pots only")
  .min(1, "At least one pot")
  .max(100, "Up to 100 pots");

/** A wish's settings, as the plant page posts them (the plant is the page's). */
export const wishFields = { mustHave: checkbox(), pots: pots.default(1) };

export const saveWishSchema = z.object({
  intent: z.literal("save"),
  plantKey,
  ...wishFields,
  // Set by the "put it back" button after a removal.
  restore: z.literal("1").optional(),
});

export const removeWishSchema = z.object({
  intent: z.literal("remove"),
  plantKey,
  confirm: z.literal("yes").optional(),
});

export const wishlistSchema = z.discriminatedUnion("intent", [saveWishSchema, removeWishSchema], {
  error: "Unknown action",
});

export const plantWishSchema = z.object({ intent: z.literal("wish"), ...wishFields });

export const plantPageSchema = z.discriminatedUnion(
  "intent",
  [plantWishSchema, z.object({ intent: z.literal("delete") })],
  { error: "Unknown action" },
);
