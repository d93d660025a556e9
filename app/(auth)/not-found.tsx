import Link from "next/link";

/** Outside a team: nothing here, and the way back is signing in. */
export default function AuthNotFound() {
  return (
    <main className="plain-page">
      <section className="card">
        <h1>Not found</h1>
        <p>There is nothing at this address.</p>
        <p>
          <Link href="/signin">Sign in</Link>
        </p>
      </section>
    </main>
  );
}
