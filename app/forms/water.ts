// The water page: log a check (source, date, a TDS or EC reading and/or a pH), remove one.
import { z } from "zod";
import { parseSource } from "~/domain/water/logged-check";
import { decimal, rowId, text } from "~/forms/fields";

export const MEASURES = ["ppm", "ec"] as const;
/** A TDS meter's ppm per µS/cm; "" is not sure. */
export const METER_SCALES = ["0.5", "0.7"] as const;

export const waterCheckSchema = z
  .object({
    intent: z.literal("log"),
    source: z.string({ error: "Choose the water source" }).max(40, "Choose the water source"),
    ownSource: text(80).optional(),
    checkedOn: z
      .string({ error: "Enter the date of the check." })
      .regex(/^\d{4}-\d{2}-\d{2}$/, "Enter the date of the check."),
    measure: z.enum(MEASURES, { error: "Choose TDS in ppm or EC in µS/cm" }).default("ppm"),
    value: decimal("Enter the reading as a number.").optional(),
    scale: z.enum(METER_SCALES, { error: "Choose the meter's scale, or not sure" }).optional(),
    ph: decimal("pH is between 0 and 14.", 0, 14).optional(),
  })
  .superRefine((v, ctx) => {
    if (!parseSource(v.source, v.ownSource ?? "")) {
      ctx.addIssue({
        code: "custom",
        path: ["ownSource"],
        message: "Name the water source (up to 40 characters), or choose tap, rain or filtered.",
      });
    }
    if (v.value !== undefined && !(v.value >= 0 && v.value <= (v.measure === "ec" ? 20000 : 10000))) {
      ctx.addIssue({
        code: "custom",
        path: ["value"],
        message: v.measure === "ec" ? "EC is a number of µS/cm, 0 to 20,000." : "TDS is a number of ppm, 0 to 10,000.",
      });
    }
    if (v.value === undefined && v.ph === undefined)
      ctx.addIssue({ code: "custom", path: ["value"], message: "Enter a TDS/EC reading, a pH, or both." });
  });

export const removeCheckSchema = z.object({ intent: z.literal("delete"), checkId: rowId() });

export const waterSchema = z.discriminatedUnion("intent", [waterCheckSchema, removeCheckSchema], {
  error: "Unknown action",
});
