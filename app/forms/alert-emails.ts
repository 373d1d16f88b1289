// The site's alerts page: acknowledging an alert, and each member's alert e-mails (kinds, quiet hours).
import { z } from "zod";
import { clockToMinute } from "~/domain/alerts/quiet";
import { WATCH_KINDS } from "~/domain/vocabulary";
import { checkbox, rowId, text } from "~/forms/fields";

const QUIET_FORMAT = "Enter quiet hours as times like 22:30.";
/** A time of day as typed ("22:30"), read as minutes since midnight; empty is not given. */
const quietTime = text(10, QUIET_FORMAT)
  .refine((s) => s === "" || clockToMinute(s) !== null, QUIET_FORMAT)
  .transform((s) => (s === "" ? null : clockToMinute(s)))
  .optional()
  .transform((m) => m ?? null);

export const acknowledgeSchema = z.object({
  intent: z.literal("acknowledge"),
  eventId: rowId("Choose an alert; reload the page and try again."),
});

export const alertEmailsSchema = z
  .object({
    intent: z.literal("preferences"),
    email: checkbox(),
    kinds: z.array(z.enum(WATCH_KINDS, { error: "Choose kinds from the list" })).default([]),
    quietFrom: quietTime,
    quietTo: quietTime,
  })
  .refine((v) => (v.quietFrom === null) === (v.quietTo === null), {
    path: ["quietTo"],
    message: "Give both ends of the quiet hours, or neither.",
  });

export const siteAlertsSchema = z.discriminatedUnion("intent", [acknowledgeSchema, alertEmailsSchema], {
  error: "Unknown action",
});
