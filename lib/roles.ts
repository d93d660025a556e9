/**
 * Roles in a team, from least to most trusted. Shared by the server guard and the screens (which
 * hide what a role cannot do; the server still checks every request).
 */
export const ROLES = ["viewer", "pilot", "tech", "owner"] as const;
export type Role = (typeof ROLES)[number];

/** What each role may do, in words: the Team screen shows these and the README quotes them. */
export const ROLE_DESCRIPTIONS: Readonly<Record<Role, string>> = {
  viewer: "sees everything and changes nothing",
  pilot: "also uploads logs and logs crashes",
  tech: "also works on airframes, parts, events and baselines",
  owner: "also manages members and API tokens",
};

export function isRole(value: string): value is Role {
  return (ROLES as readonly string[]).includes(value);
}

export function roleAtLeast(role: Role, minimum: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(minimum);
}

/**
 * Who made a record, as the record's `…ById` column keeps it: the member's user id, or "token" for
 * an API token (its name is in the audit entry).
 */
export function actorRef(actor: Pick<Actor, "userId">): string {
  return actor.userId ?? "token";
}

/** Who is acting: a signed-in member, or an API token acting for its team. */
export interface Actor {
  teamId: string;
  role: Role;
  /** null for an API token */
  userId: string | null;
  /** shown in the audit trail */
  name: string;
  via: "session" | "token";
  /** the signed-in session (lib/server/sessions.ts), when via is "session" and a request made it */
  sessionId?: string;
}
