import { z } from "zod";
import { ROLES } from "@/lib/roles";
import { nameField } from "./common";

/**
 * A new password's length rules, checked in the form; the server also refuses common passwords,
 * the email and the current password (lib/server/passwords.ts). 72 bytes is bcrypt's limit.
 */
export const newPasswordField = z
  .string()
  .min(12, "Choose a password of at least 12 characters.")
  .refine(
    (v) => new TextEncoder().encode(v).length <= 72,
    "Keep the password to 72 bytes (about 72 plain letters).",
  );

export const memberSchema = z.object({
  email: z.string().trim().toLowerCase().email("Give the member's email."),
  name: nameField("name", 80),
  role: z.enum(ROLES, { message: "Choose a role." }),
  password: newPasswordField,
});

export const membershipSchema = z.object({ membershipId: z.string().min(1).max(64) });
export const invitationSchema = z.object({
  invitationId: z.string().min(1).max(64),
  answer: z.enum(["accept", "decline"]).default("accept"),
});

export const roleChangeSchema = z.object({
  membershipId: z.string().min(1),
  role: z.enum(ROLES, { message: "Choose a role." }),
});

export const tokenSchema = z.object({
  name: nameField("token name", 60),
});

export const importProfileSchema = z.object({
  name: nameField("profile name", 60),
  mapText: z.string().trim().min(1, "Give the column map.").max(2000),
});

export const passwordChangeSchema = z
  .object({
    current: z.string().min(1, "Give your current password."),
    next: newPasswordField,
    confirm: z.string(),
  })
  .refine((v) => v.next === v.confirm, {
    message: "The two new passwords differ.",
    path: ["confirm"],
  });

export const switchTeamSchema = z.object({ teamId: z.string().min(1) });
