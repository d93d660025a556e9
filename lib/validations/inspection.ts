import { z } from "zod";
import { dateTimeField, idField, nameField, stringList } from "./common";

/** The bench checklist offered after a crash or a flagged log. Our own wording. */
export const INSPECTION_CHECKLIST = [
  "props off and battery disconnected before starting",
  "every arm checked by eye and gently flexed for cracks and delamination",
  "frame and arm screws checked for tightness",
  "motors spun by hand: smooth, no grinding, no play in the bell",
  "motor shafts straight, bells seated, screws not touching windings",
  "props replaced or checked for nicks, cracks and bends",
  "flight-controller stack soft-mounts and screws checked",
  "camera, antenna and battery strap secure",
  "LiPo pack checked: no puffing, dents or cut wires",
] as const;

export const inspectionSchema = z.object({
  airframeId: idField,
  at: dateTimeField,
  findings: nameField("findings (what you saw and did)", 2000),
  checklist: stringList,
  returnToService: z
    .string()
    .optional()
    .transform((v) => v === "on" || v === "true"),
});
export type InspectionInput = z.infer<typeof inspectionSchema>;
