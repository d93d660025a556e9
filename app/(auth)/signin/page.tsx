import { demoAccountsExist, demoMode } from "@/lib/server/demo-mode";
import { SignInForm } from "./sign-in-form";

export const dynamic = "force-dynamic";

/** Sign-in. In demo mode, while the invented demo team's accounts exist, their sign-in is shown here. */
export default async function SignInPage() {
  const demo = demoMode() && (await demoAccountsExist());
  return (
    <main className="signin">
      <div className="card">
        <h1>heatcheck</h1>
        <p className="muted">Sign in to your team&apos;s pit board.</p>
        <SignInForm />
        {demo ? (
          <div className="demo-accounts">
            <h3>Demo team</h3>
            <p>
              Owner: <code>owner@heatcheck.test</code> / <code>pitwall-owner-2026</code>
              <br />
              Viewer: <code>viewer@heatcheck.test</code> / <code>pitwall-viewer-2026</code>
            </p>
            <p className="muted small">Also tech@ and pilot@heatcheck.test (passwords pitwall-tech-2026, pitwall-pilot-2026).</p>
          </div>
        ) : null}
      </div>
    </main>
  );
}
