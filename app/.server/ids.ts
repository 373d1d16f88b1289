// Ids and free text from URLs and forms, parsed before they reach a query. An id is a positive
// PostgreSQL integer (int4): anything else in a path is a 404 (nothing by that id can exist), and
// in a form field a 400 with a clear message. PostgreSQL refuses NUL in text, so free text loses it
// (and the other C0 control characters a keyboard cannot type) before it is stored.
import { data } from "react-router";
import { z } from "zod";
import { cleanText, INT4_MAX } from "~/forms/fields";

export { cleanText, INT4_MAX };

const idSchema = z
  .string()
  .trim()
  .regex(/^[1-9][0-9]{0,9}$/)
  .transform(Number)
  .pipe(z.number().int().positive().max(INT4_MAX));

/** The id as a number, or null when it is not a positive int4 written in plain digits. */
export function toId(value: unknown): number | null {
  if (typeof value === "number") return Number.isInteger(value) && value > 0 && value <= INT4_MAX ? value : null;
  const r = idSchema.safeParse(value);
  return r.success ? r.data : null;
}

/** A route parameter naming a row: 404 when it cannot name one. */
export function paramId(value: unknown): number {
  const id = toId(value);
  if (id === null) throw data("Not found", { status: 404 });
  return id;
}

/** A form field naming a row: 400 with `message` when it is missing or malformed. */
export function formId(
  form: FormData | URLSearchParams,
  name: string,
  message = "That choice is not valid; reload the page and try again.",
): number {
  const id = toId(form.get(name));
  if (id === null) throw data(message, { status: 400 });
  return id;
}

/** One line of text for a mail header or a subject: no line breaks or controls, at most `max` characters. */
export function oneLine(s: string, max = 60) {
  const flat = s
    .replace(/[\u0000-\u001F\u007F\u2028\u2029]+/g, " ")
    .replace(/\s+/g, " ")
    .trim();
  return flat.length > max ? `${flat.slice(0, max - 1).trimEnd()}…` : flat;
}

/** The posted form, or a 400 when the body is not one (a broken multipart upload, a wrong content type). */
export async function readForm(request: Request): Promise<FormData> {
  try {
    return await request.formData();
  } catch {
    throw data("The form could not be read: send it again from the page.", { status: 400 });
  }
}

/**
 * A form that failed on fields the page writes itself (an id, the intent) came from a stale or
 * altered page, where a field error would show nowhere: a 400 with the first message.
 */
export function refuseForm(
  error: Record<string, string[] | null> | null | undefined,
  fallback = "Unknown action",
): never {
  const first = Object.values(error ?? {}).find((m) => m?.length)?.[0];
  throw data(first ?? fallback, { status: 400 });
}
