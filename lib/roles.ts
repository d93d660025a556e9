/**
 * Roles in a team, from least to most trusted. Shared by the server guard and the screens (which
 * hide what a role cannot do; the server still checks every request).
 *  viewer: sees everything, changes nothing
 *  pilot:  also uploads logs and logs crashes
 *  tech:   also does everything on airframes, parts, events and baselines
 *  owner:  also manages members and API tokens
 */
export const ROLES = ["viewer", "pilot", "tech", "owner"] as const;
export type Role = (typeof ROLES)[number];

export function isRole(value: string): value is Role {
  return (ROLES as readonly string[]).includes(value);
}

export function roleAtLeast(role: Role, minimum: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(minimum);
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
