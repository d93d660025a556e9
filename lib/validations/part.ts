import { z } from "zod";
import { dateTimeField, idField, nameField, optionalNumber, optionalText } from "./common";

export const PART_KINDS = [
  "frame",
  "arm",
  "motor",
  "prop-set",
  "flight-controller",
  "esc",
  "camera",
  "video-transmitter",
  "receiver",
  "antenna",
] as const;
export type PartKind = (typeof PART_KINDS)[number];
export const PART_STATUSES = ["stock", "installed", "damaged", "scrapped"] as const;

export const partSchema = z.object({
  kind: z.enum(PART_KINDS, { message: "Choose the kind of part." }),
  model: nameField("model", 80),
  label: optionalText(40),
  supplier: optionalText(80),
  cost: optionalNumber(0, 100000),
  acquiredAt: z
    .string()
    .trim()
    .optional()
    .transform((v) => (v ? new Date(v) : null)),
  lifeFlights: optionalNumber(1, 100000, true),
  lifeMinutes: optionalNumber(1, 1000000),
  quantity: optionalNumber(1, 200, true),
  notes: optionalText(),
});
export type PartInput = z.infer<typeof partSchema>;

export const partStatusSchema = z.object({
  partId: idField,
  status: z.enum(["stock", "damaged", "scrapped"], {
    message: "Choose stock, damaged or scrapped.",
  }),
});

/** Take one part off an airframe position and put another on, with a reason. */
export const swapSchema = z.object({
  airframeId: idField,
  position: nameField("position", 60),
  newPartId: idField,
  reason: nameField("reason for the swap", 300),
  removedStatus: z.enum(["stock", "damaged", "scrapped"]).default("damaged"),
  at: dateTimeField,
});
export type SwapInput = z.infer<typeof swapSchema>;
