import { z } from "zod";
import { dateTimeField, idField, nameField, optionalText, stringList } from "./common";

export const eventSchema = z.object({
  name: nameField("event name", 80),
  venue: optionalText(120),
  startsAt: dateTimeField,
});

export const heatSchema = z.object({
  eventId: idField,
  name: nameField("heat name", 40),
  startsAt: dateTimeField,
});

export const heatEntriesSchema = z.object({
  heatId: idField,
  airframeIds: stringList,
});
