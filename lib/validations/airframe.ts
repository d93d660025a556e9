import { z } from "zod";
import { motorPositionName } from "@/lib/health/motor-positions";
import { nameField, optionalText } from "./common";

/** An airframe's state: may it fly (`ready`) or not (`grounded`). Its health is an assessment's status. */
export const AIRFRAME_STATES = ["ready", "grounded"] as const;
export type AirframeState = (typeof AIRFRAME_STATES)[number];

export const airframeSchema = z.object({
  name: nameField("airframe name", 40),
  frameDesign: nameField("frame design", 80),
  serial: optionalText(80),
  notes: optionalText(),
});
export type AirframeInput = z.infer<typeof airframeSchema>;

export const airframeStateSchema = z.object({
  airframeId: z.string().min(1),
  state: z.enum(AIRFRAME_STATES, { message: "Choose ready or grounded." }),
  note: optionalText(500),
});

/** Positions on a quad, in the order the screens list them. Free text is allowed too. */
export const STANDARD_POSITIONS: readonly string[] = [
  "frame",
  "arm front-left",
  "arm front-right",
  "arm rear-right",
  "arm rear-left",
  ...[1, 2, 3, 4].map(motorPositionName),
  "props",
  "flight controller",
  "ESC",
  "camera",
  "video transmitter",
  "receiver",
  "antenna",
];
