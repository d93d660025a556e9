"use server";

import { revalidatePath } from "next/cache";
import { cookies } from "next/headers";
import { z } from "zod";
import { answerInvitation, assertMemberOf, changePassword } from "@/lib/server/account";
import { createAirframe, setAirframeRetired, setAirframeState } from "@/lib/server/airframes";
import { requireUser, TEAM_COOKIE, TEAM_COOKIE_OPTIONS } from "@/lib/server/guard";
import { runAction, type ActionState } from "@/lib/server/actions";
import { setBaseline } from "@/lib/server/baselines";
import { logCrash, recordInspection } from "@/lib/server/crashes";
import { createEvent, createHeat, setHeatEntries } from "@/lib/server/events";
import { reanalyseLog } from "@/lib/server/ingest";
import { createParts, setPartStatus, swapPart } from "@/lib/server/parts";
import {
  changeRole,
  confirmToken,
  createToken,
  inviteMember,
  removeMember,
  revokeToken,
  saveProfile,
  withdrawInvitation,
} from "@/lib/server/team";
import { airframeSchema, airframeStateSchema } from "@/lib/validations/airframe";
import { baselineSchema } from "@/lib/validations/baseline";
import { idField, optionalText } from "@/lib/validations/common";
import { crashSchema } from "@/lib/validations/crash";
import { eventSchema, heatEntriesSchema, heatSchema } from "@/lib/validations/event";
import { inspectionSchema } from "@/lib/validations/inspection";
import { partSchema, partStatusSchema, swapSchema } from "@/lib/validations/part";
import {
  importProfileSchema,
  invitationSchema,
  memberSchema,
  membershipSchema,
  passwordChangeSchema,
  roleChangeSchema,
  switchTeamSchema,
  tokenSchema,
} from "@/lib/validations/team";
import { isDomainError } from "@/lib/errors";
import { formToObject } from "@/lib/validations/common";

// Every action: guard (role) → zod → service, via runAction. The service checks role and team again.

function refreshAirframe(id: string) {
  revalidatePath("/");
  revalidatePath("/fleet");
  revalidatePath(`/airframes/${id}`);
}

export async function createAirframeAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("createAirframe", "tech", airframeSchema, form, async (actor, input) => {
    await createAirframe(actor, input);
    revalidatePath("/fleet");
    return `${input.name} added to the fleet.`;
  });
}

export async function setAirframeStateAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("setAirframeState", "tech", airframeStateSchema, form, async (actor, input) => {
    await setAirframeState(actor, input.airframeId, input.state, input.note);
    refreshAirframe(input.airframeId);
    return input.state === "grounded" ? "Airframe grounded." : "Airframe back in service.";
  });
}

export async function retireAirframeAction(_: ActionState, form: FormData): Promise<ActionState> {
  const schema = z.object({ airframeId: idField, retired: z.enum(["true", "false"]) });
  return runAction("retireAirframe", "tech", schema, form, async (actor, input) => {
    await setAirframeRetired(actor, input.airframeId, input.retired === "true");
    refreshAirframe(input.airframeId);
    return input.retired === "true"
      ? "Airframe retired: it leaves the queue."
      : "Airframe reinstated.";
  });
}

export async function logCrashAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("logCrash", "pilot", crashSchema, form, async (actor, input) => {
    await logCrash(actor, input);
    refreshAirframe(input.airframeId);
    return input.ground || input.severity !== "minor"
      ? "Crash logged; the airframe is grounded until inspected."
      : "Crash logged.";
  });
}

export async function swapPartAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("swapPart", "tech", swapSchema, form, async (actor, input) => {
    const r = await swapPart(actor, input);
    refreshAirframe(input.airframeId);
    revalidatePath("/parts");
    return r.removedPartId
      ? `Swapped at ${input.position}; the old part is marked ${input.removedStatus}.`
      : `Fitted at ${input.position}.`;
  });
}

export async function recordInspectionAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("recordInspection", "tech", inspectionSchema, form, async (actor, input) => {
    await recordInspection(actor, input);
    refreshAirframe(input.airframeId);
    return input.returnToService
      ? "Inspection signed off; back in service."
      : "Inspection recorded; still grounded.";
  });
}

export async function setBaselineAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("setBaseline", "tech", baselineSchema, form, async (actor, input) => {
    const r = await setBaseline(actor, input.airframeId, input.logIds, input.reason);
    refreshAirframe(input.airframeId);
    return `Baseline set from ${input.logIds.length} log(s); ${r.rescored} later log(s) scored again.`;
  });
}

export async function reanalyseAction(_: ActionState, form: FormData): Promise<ActionState> {
  const schema = z.object({ logId: idField, airframeId: idField, mapText: optionalText(2000) });
  return runAction("reanalyse", "tech", schema, form, async (actor, input) => {
    await reanalyseLog(actor, input.logId, input.mapText || undefined);
    refreshAirframe(input.airframeId);
    return "Analysis queued again.";
  });
}

export async function addPartsAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("addParts", "tech", partSchema, form, async (actor, input) => {
    const created = await createParts(actor, input);
    revalidatePath("/parts");
    return `${created.length} × ${input.kind} ${input.model} added to stock.`;
  });
}

export async function setPartStatusAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("setPartStatus", "tech", partStatusSchema, form, async (actor, input) => {
    await setPartStatus(actor, input.partId, input.status);
    revalidatePath("/parts");
    return `Part marked ${input.status}.`;
  });
}

export async function createEventAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("createEvent", "tech", eventSchema, form, async (actor, input) => {
    await createEvent(actor, input);
    revalidatePath("/events");
    return `${input.name} added.`;
  });
}

export async function createHeatAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("createHeat", "tech", heatSchema, form, async (actor, input) => {
    await createHeat(actor, input);
    revalidatePath("/events");
    return `${input.name} added.`;
  });
}

export async function setHeatEntriesAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("setHeatEntries", "tech", heatEntriesSchema, form, async (actor, input) => {
    await setHeatEntries(actor, input.heatId, input.airframeIds);
    revalidatePath("/events");
    revalidatePath("/");
    return `${input.airframeIds.length} airframe(s) in this heat.`;
  });
}

export async function inviteMemberAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("inviteMember", "owner", memberSchema, form, async (actor, input) => {
    const message = await inviteMember(actor, input);
    revalidatePath("/team");
    return message;
  });
}

export async function withdrawInvitationAction(
  _: ActionState,
  form: FormData,
): Promise<ActionState> {
  return runAction("withdrawInvitation", "owner", invitationSchema, form, async (actor, input) => {
    await withdrawInvitation(actor, input.invitationId);
    revalidatePath("/team");
    return "Invitation withdrawn.";
  });
}

export async function removeMemberAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("removeMember", "owner", membershipSchema, form, async (actor, input) => {
    const r = await removeMember(actor, input.membershipId);
    revalidatePath("/team");
    return r.pausedTokens > 0
      ? `${r.name} removed; their sessions ended. ${r.pausedTokens} token(s) they created are paused until another owner confirms them.`
      : `${r.name} removed; their sessions ended.`;
  });
}

export async function confirmTokenAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction(
    "confirmToken",
    "owner",
    z.object({ tokenId: idField }),
    form,
    async (actor, input) => {
      await confirmToken(actor, input.tokenId);
      revalidatePath("/team");
      return "Token confirmed: it works again.";
    },
  );
}

/** Accepts or declines an invitation: needs a signed-in person, not a team (they may have none yet). */
export async function answerInvitationAction(_: ActionState, form: FormData): Promise<ActionState> {
  try {
    const user = await requireUser();
    const parsed = invitationSchema.safeParse(formToObject(form));
    if (!parsed.success) return { ok: false, message: "Choose an invitation." };
    const accept = parsed.data.answer === "accept";
    const { teamId } = await answerInvitation(user.userId, parsed.data.invitationId, accept);
    if (accept) (await cookies()).set(TEAM_COOKIE, teamId, TEAM_COOKIE_OPTIONS);
    revalidatePath("/", "layout");
    return { ok: true, message: accept ? "Welcome to the team." : "Invitation declined." };
  } catch (e) {
    if (isDomainError(e)) return { ok: false, message: e.message };
    console.error("server action answerInvitation failed", e);
    return {
      ok: false,
      message: "Something went wrong on the server; nothing was changed. Try again.",
    };
  }
}

export async function changeRoleAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("changeRole", "owner", roleChangeSchema, form, async (actor, input) => {
    await changeRole(actor, input.membershipId, input.role);
    revalidatePath("/team");
    return `Role changed to ${input.role}.`;
  });
}

export async function createTokenAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("createToken", "owner", tokenSchema, form, async (actor, input) => {
    const { token } = await createToken(actor, input.name);
    revalidatePath("/team");
    return { ok: true, message: `Token "${input.name}" created.`, secret: token };
  });
}

export async function revokeTokenAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction(
    "revokeToken",
    "owner",
    z.object({ tokenId: idField }),
    form,
    async (actor, input) => {
      await revokeToken(actor, input.tokenId);
      revalidatePath("/team");
      return "Token revoked.";
    },
  );
}

export async function saveProfileAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("saveProfile", "pilot", importProfileSchema, form, async (actor, input) => {
    await saveProfile(actor, input.name, input.mapText);
    revalidatePath("/upload");
    revalidatePath("/team");
    return `Import profile "${input.name}" saved.`;
  });
}

export async function changePasswordAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("changePassword", "viewer", passwordChangeSchema, form, async (actor, input) => {
    const r = await changePassword(actor, input.current, input.next);
    return `Password changed; ${r.endedSessions} other session(s) of yours ended. Use the new one next time you sign in.`;
  });
}

export async function switchTeamAction(_: ActionState, form: FormData): Promise<ActionState> {
  return runAction("switchTeam", "viewer", switchTeamSchema, form, async (actor, input) => {
    await assertMemberOf(actor, input.teamId);
    (await cookies()).set(TEAM_COOKIE, input.teamId, TEAM_COOKIE_OPTIONS);
    revalidatePath("/", "layout");
    return "Team switched.";
  });
}
