import { z } from "zod";

// E-mail addresses: one normal form (trimmed, lower case) everywhere, and one
// schema for every form and route that takes an address.

export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

export const emailSchema = z
  .string({ error: "Enter your e-mail address." })
  .trim()
  .min(1, "Enter your e-mail address.")
  .max(254, "An e-mail address has at most 254 characters.")
  .pipe(z.email({ error: "Enter a valid e-mail address, like name@example.org." }))
  .transform(normalizeEmail);
