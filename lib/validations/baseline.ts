import { z } from "zod";
import { idField, nameField, stringList } from "./common";

export const baselineSchema = z.object({
  airframeId: idField,
  logIds: stringList.refine((v) => v.length >= 1, "Choose at least one known-good log."),
  reason: nameField("reason for this baseline", 300),
});
