import "server-only";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import bcrypt from "bcryptjs";
import { InputError } from "@/lib/errors";

/** bcrypt with cost 10: about 60 ms a check on the pit laptop, slow enough against guessing. */
export async function hashPassword(password: string): Promise<string> {
  assertBcryptLength(password);
  return bcrypt.hash(password, 10);
}

/**
 * Compares a password with a stored hash. bcrypt reads only the first 72 bytes, so a longer
 * password would match any password sharing those bytes: such a password never matches.
 */
export async function passwordMatches(password: string, hash: string): Promise<boolean> {
  if (Buffer.byteLength(password, "utf8") > MAX_PASSWORD_BYTES) {
    await bcrypt.compare("", DUMMY_HASH);
    return false;
  }
  return bcrypt.compare(password, hash);
}

/** A valid hash of a random string, compared against when an email is unknown. */
export const DUMMY_HASH = "$2b$10$CwTycUXWue0Thq9StjUM0uJ8.Y0bQwZ9cP8q8vPzY1z9s0r0m9s9e";

export const MIN_PASSWORD_CHARS = 12;
/** bcrypt's input limit (it ignores every byte after the 72nd). */
export const MAX_PASSWORD_BYTES = 72;

function assertBcryptLength(password: string): void {
  if (Buffer.byteLength(password, "utf8") > MAX_PASSWORD_BYTES) {
    throw new InputError(
      `Keep the password to ${MAX_PASSWORD_BYTES} bytes (about ${MAX_PASSWORD_BYTES} plain letters); longer ones cannot be checked in full.`,
      "password",
    );
  }
}

let common: Set<string> | undefined;

/** The shipped list of common passwords (see lib/server/data/README.md for its public source). */
function commonPasswords(): Set<string> {
  common ??= new Set(
    readFileSync(join(process.cwd(), "lib", "server", "data", "common-passwords.txt"), "utf8")
      .split("\n")
      .map((l) => l.trim())
      .filter((l) => l !== ""),
  );
  return common;
}

/**
 * The password rules (OWASP ASVS 4.0 §2.1): at least 12 characters, at most 72 bytes (bcrypt),
 * not whitespace only, not on the common-password list, not the account's own email, and not the
 * current password when changing it. Throws InputError naming the field; nothing is stored.
 */
export async function assertAcceptablePassword(
  password: string,
  context: { email: string; field: string; currentHash?: string },
): Promise<void> {
  const field = context.field;
  if (password.trim() === "")
    throw new InputError("A password of spaces only is too easy to guess; choose another.", field);
  if ([...password].length < MIN_PASSWORD_CHARS)
    throw new InputError(`Choose a password of at least ${MIN_PASSWORD_CHARS} characters.`, field);
  if (Buffer.byteLength(password, "utf8") > MAX_PASSWORD_BYTES) {
    throw new InputError(
      `Keep the password to ${MAX_PASSWORD_BYTES} bytes (about ${MAX_PASSWORD_BYTES} plain letters); longer ones cannot be checked in full.`,
      field,
    );
  }
  const lower = password.toLowerCase();
  const email = context.email.trim().toLowerCase();
  if (email !== "" && (lower === email || lower === email.split("@")[0]))
    throw new InputError("The password must not be the email address.", field);
  if (commonPasswords().has(lower))
    throw new InputError("That password is on a list of common passwords; choose another.", field);
  if (context.currentHash && (await bcrypt.compare(password, context.currentHash))) {
    throw new InputError("The new password is the current one; choose a different one.", field);
  }
}
