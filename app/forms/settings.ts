// The settings page's two forms, one action: a discriminated union on `intent`.
import { z } from "zod";
import { TEMPERATURE_UNITS } from "~/domain/vocabulary";
import { MAX_PASSWORD_LENGTH, newPassword } from "~/forms/auth";

export const unitSchema = z.object({
  intent: z.literal("unit"),
  unit: z.enum(TEMPERATURE_UNITS, { error: "Choose °C or °F" }),
});

export const passwordSchema = z.object({
  intent: z.literal("password"),
  current: z
    .string({ error: "Enter your current password" })
    .max(MAX_PASSWORD_LENGTH, "Your current password is not right."),
  next: newPassword("Choose a new password"),
});

export const settingsSchema = z.discriminatedUnion("intent", [unitSchema, passwordSchema], { error: "Unknown action" });
