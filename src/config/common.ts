import { z } from "zod";

/** Identifiers that become URL path segments and file names. */
export const slug = z
  .string({ required_error: "is required", invalid_type_error: "must be text" })
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "must use only lower-case letters, digits and single hyphens, e.g. dot-junction-sweep");

/** Dataset ids: referenced from checks and shown in tables. */
export const datasetId = z
  .string({ required_error: "is required", invalid_type_error: "must be text" })
  .regex(/^[A-Za-z0-9][A-Za-z0-9_-]*$/, "must start with a letter or digit and use only letters, digits, '-' and '_'");

export const text = (what = "text") =>
  z.string({ required_error: "is required", invalid_type_error: `must be ${what}` }).min(1, `must not be empty`);

export const positive = (unit: string) =>
  z
    .number({ required_error: "is required", invalid_type_error: `must be a positive number of ${unit}` })
    .finite(`must be a finite number of ${unit}`)
    .positive(`must be a positive number of ${unit}`);

export const finite = (unit: string) =>
  z
    .number({ invalid_type_error: `must be a number of ${unit}` })
    .finite(`must be a finite number of ${unit}`);

/** Relative path inside the audit folder; confinement is enforced when it is resolved. */
export const relativeFile = text("a path relative to the audit folder");

/** `2026-02-30` is refused: the day must exist in the proleptic Gregorian calendar (ISO 8601). */
export function isCalendarDate(text: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const day = new Date(Date.UTC(y, mo - 1, d));
  return day.getUTCFullYear() === y && day.getUTCMonth() === mo - 1 && day.getUTCDate() === d;
}

/** A calendar date written YYYY-MM-DD that exists. */
export const calendarDate = z
  .string({ invalid_type_error: "must be a date written YYYY-MM-DD" })
  .regex(/^\d{4}-\d{2}-\d{2}$/, "must be a date written YYYY-MM-DD")
  // Only a date in the right form is looked up, so a malformed one gets one message.
  .refine((t) => !/^\d{4}-\d{2}-\d{2}$/.test(t) || isCalendarDate(t), "must be a date that exists (YYYY-MM-DD; months have 28 to 31 days)");
