import { ActionForm } from "@/app/_components/action-form";
import { InvitationAnswer } from "@/app/_components/invitation-answer";
import { SelectField, TextField } from "@/app/_components/fields";
import { ROLE_DESCRIPTIONS, ROLES, roleAtLeast } from "@/lib/roles";
import { requireMember } from "@/lib/server/guard";
import { myInvitations, myTeams } from "@/lib/server/account";
import {
  listMembers,
  listProfiles,
  listTokens,
  pendingInvitations,
  recentAudit,
} from "@/lib/server/team";
import {
  changePasswordAction,
  changeRoleAction,
  confirmTokenAction,
  createTokenAction,
  inviteMemberAction,
  removeMemberAction,
  revokeTokenAction,
  switchTeamAction,
  withdrawInvitationAction,
} from "../actions";
import { WHEN_SHORT as WHEN } from "@/app/_components/dates";

export const dynamic = "force-dynamic";

export default async function TeamPage() {
  const actor = await requireMember("viewer");
  const isOwner = roleAtLeast(actor.role, "owner");
  const [members, invited, tokens, profiles, audit, teams, invitations] = await Promise.all([
    isOwner ? listMembers(actor) : Promise.resolve([]),
    isOwner ? pendingInvitations(actor) : Promise.resolve([]),
    isOwner ? listTokens(actor) : Promise.resolve([]),
    listProfiles(actor),
    recentAudit(actor),
    myTeams(actor),
    actor.userId ? myInvitations(actor.userId) : Promise.resolve([]),
  ]);
  return (
    <>
      <h1>Team</h1>
      {!isOwner ? (
        <p className="muted">
          Members, roles and API tokens are managed by the team&apos;s owners.
        </p>
      ) : null}
      {isOwner ? (
        <div className="grid two">
          <section className="card">
            <h2>Members and roles</h2>
            <p className="muted small">
              {ROLES.map((r) => `${r}: ${ROLE_DESCRIPTIONS[r]}`).join(" · ")}.
            </p>
            <table data-testid="members">
              <tbody>
                {members.map((m) => (
                  <tr key={m.id}>
                    <td>
                      <strong>{m.user.name}</strong>
                      <div className="muted small">{m.user.email}</div>
                    </td>
                    <td>
                      <ActionForm action={changeRoleAction} submitLabel="Change" compact>
                        <input type="hidden" name="membershipId" value={m.id} />
                        <select
                          name="role"
                          defaultValue={m.role}
                          aria-label={`role of ${m.user.name}`}
                        >
                          {ROLES.map((r) => (
                            <option key={r}>{r}</option>
                          ))}
                        </select>
                      </ActionForm>
                    </td>
                    <td>
                      <ActionForm
                        action={removeMemberAction}
                        submitLabel={m.userId === actor.userId ? "Leave team" : "Remove"}
                        danger
                        compact
                      >
                        <input type="hidden" name="membershipId" value={m.id} />
                      </ActionForm>
                    </td>
                  </tr>
                ))}
                {invited.map((i) => (
                  <tr key={i.id}>
                    <td>
                      <strong>{i.email}</strong>
                      <div className="muted small">
                        invited as {i.role} · {WHEN.format(i.createdAt)} · not yet accepted
                      </div>
                    </td>
                    <td colSpan={2}>
                      <ActionForm action={withdrawInvitationAction} submitLabel="Withdraw" compact>
                        <input type="hidden" name="invitationId" value={i.id} />
                      </ActionForm>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <details className="action">
              <summary>Invite a member</summary>
              <p className="muted small">
                The person joins when they accept, after signing in. An email with no account yet
                gets one with the first password you give.
              </p>
              <ActionForm action={inviteMemberAction} submitLabel="Invite">
                <div className="row">
                  <TextField label="Name" name="name" />
                  <TextField label="Email" name="email" type="email" />
                </div>
                <div className="row">
                  <SelectField label="Role" name="role" options={ROLES} defaultValue="pilot" />
                  <TextField
                    label="First password for a new account (12+ characters)"
                    name="password"
                    type="password"
                    autoComplete="new-password"
                  />
                </div>
              </ActionForm>
            </details>
          </section>
          <section className="card">
            <h2>API tokens for scripted uploads</h2>
            <p className="muted small">
              A token belongs to the team: it may upload logs and read the queue and the airframes.
              Only a hash is stored. When its creator stops being an owner it pauses until another
              owner confirms it.
            </p>
            <table data-testid="tokens">
              <tbody>
                {tokens.map((t) => (
                  <tr key={t.id}>
                    <td>
                      <strong>{t.name}</strong> <code>{t.prefix}…</code>
                      <div className="muted small">
                        created by {t.createdByName} {WHEN.format(t.createdAt)}
                        {t.lastUsedAt
                          ? ` · last used ${WHEN.format(t.lastUsedAt)}`
                          : " · never used"}
                      </div>
                    </td>
                    <td>
                      {t.revokedAt ? (
                        <span className="muted">revoked {WHEN.format(t.revokedAt)}</span>
                      ) : t.suspendedAt ? (
                        <ActionForm
                          action={confirmTokenAction}
                          submitLabel="Confirm: keep it working"
                          compact
                        >
                          <span className="muted small">
                            paused since {WHEN.format(t.suspendedAt)}: its creator is no longer an
                            owner{" "}
                          </span>
                          <input type="hidden" name="tokenId" value={t.id} />
                        </ActionForm>
                      ) : (
                        <ActionForm action={revokeTokenAction} submitLabel="Revoke" danger compact>
                          <input type="hidden" name="tokenId" value={t.id} />
                        </ActionForm>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <ActionForm action={createTokenAction} submitLabel="Create token" testId="token-form">
              <TextField label="Name" name="name" placeholder="pit laptop uploader" />
            </ActionForm>
          </section>
        </div>
      ) : null}
      <div className="grid two space-above">
        <section className="card" data-testid="account">
          <h2>Your account</h2>
          {invitations.map((i) => (
            <div key={i.id} className="row" data-testid="invitation">
              <span>
                Invitation to <strong>{i.team.name}</strong> as {i.role}
              </span>
              <InvitationAnswer invitationId={i.id} />
            </div>
          ))}
          {teams.length > 1 ? (
            <ActionForm action={switchTeamAction} submitLabel="Switch team" compact>
              <SelectField
                label="Team"
                name="teamId"
                defaultValue={actor.teamId}
                options={teams.map((t) => ({
                  value: t.teamId,
                  label: `${t.team.name} (${t.role})`,
                }))}
              />
            </ActionForm>
          ) : null}
          <details className="action space-above-sm">
            <summary>Change your password</summary>
            <ActionForm action={changePasswordAction} submitLabel="Change password">
              <TextField
                label="Current password"
                name="current"
                type="password"
                autoComplete="current-password"
              />
              <div className="row">
                <TextField
                  label="New password (12+ characters)"
                  name="next"
                  type="password"
                  autoComplete="new-password"
                />
                <TextField
                  label="New password again"
                  name="confirm"
                  type="password"
                  autoComplete="new-password"
                />
              </div>
            </ActionForm>
          </details>
        </section>
        <section className="card">
          <h2>Import profiles</h2>
          {profiles.length === 0 ? (
            <p className="muted">
              None yet: the upload screen saves one when you map a logger&apos;s columns.
            </p>
          ) : null}
          <ul>
            {profiles.map((p) => (
              <li key={p.id}>
                <strong>{p.name}</strong> <code className="small">{p.mapText}</code>
              </li>
            ))}
          </ul>
        </section>
        <section className="card">
          <h2>Recent changes</h2>
          <ul className="timeline">
            {audit.map((a) => (
              <li key={a.id}>
                <span className="small muted">{WHEN.format(a.at)}</span>
                <span className="kind">{a.action}</span>
                <span>
                  {a.userName}: {a.detail}
                </span>
              </li>
            ))}
          </ul>
        </section>
      </div>
    </>
  );
}
