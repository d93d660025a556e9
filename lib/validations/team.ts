import { z } from "zod";
import { ROLES } from "@/lib/roles";
import { nameField } from "./common";

export const memberSchema = z.object({
  email: z.string().trim().toLowerCase().email("Give the member's email."),
  name: nameField("name", 80),
  role: z.enum(ROLES, { message: "Choose a role." }),
  password: z.string().min(10, "Give a first password of at least 10 characters.").max(200),
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
    next: z.string().min(10, "Choose a new password of at least 10 characters.").max(200),
    confirm: z.string(),
  })
  .refine((v) => v.next === v.confirm, { message: "The two new passwords differ.", path: ["confirm"] });

export const switchTeamSchema = z.object({ teamId: z.string().min(1) });
