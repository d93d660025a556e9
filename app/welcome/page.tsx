import { redirect } from "next/navigation";
import { InvitationAnswer } from "@/app/_components/invitation-answer";
import { UnauthenticatedError } from "@/lib/errors";
import { myInvitations } from "@/lib/server/account";
import { requireUser } from "@/lib/server/guard";

export const dynamic = "force-dynamic";

/** For a signed-in person who belongs to no team: the invitations waiting for them. */
export default async function WelcomePage() {
  let user;
  try {
    user = await requireUser();
  } catch (e) {
    if (e instanceof UnauthenticatedError) redirect("/signin");
    throw e;
  }
  const invitations = await myInvitations(user.userId);
  return (
    <main className="plain-page">
      <div className="card">
        <h1>Welcome, {user.name}</h1>
        {invitations.length === 0 ? (
          <p>
            You are not a member of any team. Ask a team owner to invite {user.email}; the
            invitation shows here.
          </p>
        ) : (
          <ul className="stack" data-testid="invitations">
            {invitations.map((i) => (
              <li key={i.id} className="row">
                <span>
                  <strong>{i.team.name}</strong> invites you as {i.role}
                </span>
                <InvitationAnswer invitationId={i.id} />
              </li>
            ))}
          </ul>
        )}
        <p className="small">
          <a href="/">Go to your team</a> · <a href="/api/auth/signout">Sign out</a>
        </p>
      </div>
    </main>
  );
}
