import { DEMO_ACCOUNTS } from "@/lib/demo/accounts";
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
            <h2>Demo team</h2>
            <p>
              {DEMO_ACCOUNTS.map((a) => (
                <span key={a.email}>
                  {a.role}: <code>{a.email}</code> / <code>{a.password}</code>
                  <br />
                </span>
              ))}
            </p>
          </div>
        ) : null}
      </div>
    </main>
  );
}
