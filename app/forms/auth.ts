// Sign-in and sign-up: one schema per form, used by the form (conform) and the action.
import { z } from "zod";

const email = z
  .string({ error: "Enter your e-mail address" })
  .trim()
  .toLowerCase()
  .pipe(z.email("That is not an e-mail address"));

/** The longest password read anywhere; argon2 hashes every byte of it. */
export const MAX_PASSWORD_LENGTH = 256;

export const signInSchema = z.object({
  email,
  password: z
    .string({ error: "Enter your password" })
    .min(1, "Enter your password")
    .max(MAX_PASSWORD_LENGTH, "That e-mail and password do not match an account."),
  next: z.string().optional(),
});

/** A password being chosen: 10 to 200 characters. */
export const newPassword = (missing: string) =>
  z
    .string({ error: missing })
    .min(10, "Use at least 10 characters")
    .max(200, "That is longer than we accept (200 characters)");

export const signUpSchema = z.object({
  name: z.string({ error: "Tell us what to call you" }).trim().min(1, "Tell us what to call you").max(80),
  email,
  password: newPassword("Choose a password"),
  next: z.string().optional(),
});

/**
 * Where to go after signing in: a path on this site, or "/". The value is parsed the way a browser
 * reads a Location header (tabs and newlines dropped, backslashes read as slashes), against a
 * stand-in origin, and only a same-origin result is kept, re-serialised as path, query and fragment
 * (OWASP Unvalidated Redirects and Forwards Cheat Sheet).
 */
export function safeNext(next: string | null | undefined) {
  if (!next || next.length > 2048) return "/";
  const origin = "http://nichewise.invalid";
  let url: URL;
  try {
    url = new URL(next, `${origin}/`);
  } catch {
    return "/";
  }
  if (url.origin !== origin || !next.startsWith("/")) return "/";
  const path = url.pathname + url.search + url.hash;
  // "//host" would itself be read as another site.
  return path.startsWith("/") && !path.startsWith("//") ? path : "/";
}
