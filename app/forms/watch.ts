// A spot's watches: add one (of a kind, perhaps the suggested cold one), change, pause, resume or
// remove one. Values are in the member's unit; the action converts them to °C.
import { z } from "zod";
import { WATCH_KINDS, type WatchKind } from "~/domain/vocabulary";
import { checkbox, decimal, rowId, whole } from "~/forms/fields";

const MINUTES = (what: string) => `${what}: a whole number from 0 to 1,440.`;

/** The settings every watch form has; the ones a silent-sensor watch lacks are optional here and required below. */
const settings = {
  kind: z.enum(WATCH_KINDS, { error: "Choose what to watch for." }),
  threshold: decimal("Enter the threshold as a number."),
  durationMinutes: whole(MINUTES("Minutes before the alert"), 0, 1440).optional(),
  hysteresis: decimal("The margin for the all-clear must be between 0 and 20.", 0, 20).optional(),
  clearMinutes: whole(MINUTES("Minutes before the all-clear"), 0, 1440).optional(),
  earlyWarning: checkbox(),
};

type Settings = {
  kind: WatchKind;
  threshold: number;
  durationMinutes?: number;
  hysteresis?: number;
  clearMinutes?: number;
};

function checkForKind(v: Settings, ctx: z.RefinementCtx) {
  const issue = (path: string, message: string) => ctx.addIssue({ code: "custom", path: [path], message });
  if (v.kind === "silent") {
    if (!(v.threshold >= 5 && v.threshold <= 1440))
      issue("threshold", "A sensor may be silent for 5 to 1,440 minutes before the alert.");
    return;
  }
  if ((v.kind === "dry" || v.kind === "battery") && !(v.threshold > 0 && v.threshold < 100))
    issue("threshold", "Enter a percentage between 0 and 100.");
  if (v.durationMinutes === undefined) issue("durationMinutes", MINUTES("Minutes before the alert"));
  if (v.hysteresis === undefined) issue("hysteresis", "The margin for the all-clear must be between 0 and 20.");
  if (v.clearMinutes === undefined) issue("clearMinutes", MINUTES("Minutes before the all-clear"));
}

export const addWatchSchema = z
  .object({
    intent: z.literal("add"),
    ...settings,
    // Set by the suggested cold watch's form: its reason is kept while its line is the one saved.
    useSuggestion: z.literal("1").optional(),
  })
  .superRefine(checkForKind);

/** An update's kind is the stored watch's: the action sets it before parsing. */
export const updateWatchSchema = z
  .object({ intent: z.literal("update"), ruleId: rowId("Choose a watch; reload the page and try again."), ...settings })
  .superRefine(checkForKind);

const onWatch = <I extends "pause" | "resume" | "delete">(intent: I) =>
  z.object({ intent: z.literal(intent), ruleId: rowId("Choose a watch; reload the page and try again.") });

export const watchSchema = z.discriminatedUnion(
  "intent",
  [addWatchSchema, updateWatchSchema, onWatch("pause"), onWatch("resume"), onWatch("delete")],
  {
    error: "Unknown action",
  },
);
