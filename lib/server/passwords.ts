import "server-only";
import bcrypt from "bcryptjs";

/** bcrypt with cost 10: about 60 ms a check on the pit laptop, slow enough against guessing. */
export async function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, 10);
}

/** A valid hash of a random string, compared against when an email is unknown. */
export const DUMMY_HASH = "$2b$10$CwTycUXWue0Thq9StjUM0uJ8.Y0bQwZ9cP8q8vPzY1z9s0r0m9s9e";
