// Field builders shared by the form schemas: what app/.server/ids.ts does for hand-read fields
// (positive int4 ids, NUL-safe free text), as zod types that the browser can run too.
import { z } from "zod";

export const INT4_MAX = 2_147_483_647;

// NUL and the C0 controls other than tab, line feed and carriage return; DEL too.
const CONTROL = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/g;

/** Free text (notes, names) without the control characters nobody types, NUL above all. */
export const cleanText = (s: string) => s.replace(CONTROL, "");

/** Free text: controls dropped, trimmed, at most `max` characters (the form's values stay bounded). */
export const text = (max: number, tooLong = `Keep it under ${max.toLocaleString("en")} characters`) =>
  z.string().transform(cleanText).pipe(z.string().trim().max(max, tooLong));

/** A row's id from a hidden field or a choice: a positive int4 in plain digits. */
export const rowId = (message = "That choice is not valid; reload the page and try again.") =>
  z
    .string({ error: message })
    .trim()
    .regex(/^[1-9][0-9]{0,9}$/, message)
    .transform(Number)
    .pipe(z.number().int().positive().max(INT4_MAX, message));

/** A number as a grower types it (a decimal comma reads as a point), from `min` to `max`. */
export const decimal = (message: string, min = -Infinity, max = Infinity) =>
  z
    .string({ error: message })
    .trim()
    .max(40, message)
    .transform((s) => (s === "" ? NaN : Number(s.replace(",", "."))))
    .pipe(z.number({ error: message }).refine((n) => Number.isFinite(n) && n >= min && n <= max, message));

/** A whole number typed in a field, from `min` to `max`. */
export const whole = (message: string, min: number, max: number) =>
  z
    .string({ error: message })
    .trim()
    .max(12, message)
    .transform((s) => (s === "" ? NaN : Number(s)))
    .pipe(z.number({ error: message }).refine((n) => Number.isInteger(n) && n >= min && n <= max, message));

/** A checkbox: on when ticked, absent when not. */
export const checkbox = () =>
  z
    .literal("on")
    .optional()
    .transform((v) => v === "on");
