import Link from "next/link";

/** Any unknown address, an unknown id, or another team's id: the same screen, status 404. */
export default function NotFound() {
  return (
    <main className="plain-page">
      <div className="card">
        <h1>Not found</h1>
        <p>
          There is nothing at this address in your team: the airframe, part or page may have been
          removed, or the link is wrong.
        </p>
        <p>
          <Link href="/">Back to the inspection queue</Link>
        </p>
      </div>
    </main>
  );
}
