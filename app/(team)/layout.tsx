import { redirect } from "next/navigation";
import type { ReactNode } from "react";
import { ForbiddenError, UnauthenticatedError } from "@/lib/errors";
import { NO_TEAM_MESSAGE, requireMember } from "@/lib/server/guard";
import { teamName } from "@/lib/server/team";
import { Nav } from "./_components/nav";

export const dynamic = "force-dynamic";

export default async function TeamLayout({ children }: { children: ReactNode }) {
  let actor;
  try {
    actor = await requireMember("viewer");
  } catch (e) {
    if (e instanceof UnauthenticatedError) redirect("/signin");
    // Signed in but in no team (yet, or no longer): the page of invitations.
    if (e instanceof ForbiddenError && e.message === NO_TEAM_MESSAGE) redirect("/welcome");
    throw e;
  }
  return (
    <>
      {/* The first Tab stop: past the navigation, straight to the screen. */}
      <a className="skip-link" href="#screen">
        Skip to the screen
      </a>
      <Nav teamName={await teamName(actor)} userName={actor.name} role={actor.role} />
      <main id="screen" tabIndex={-1}>
        {children}
      </main>
    </>
  );
}
