import Link from "next/link";

/**
 * An id this team does not have (unknown, removed, or another team's): `orNotFound` in a page
 * turns the service's NotFoundError into this screen, inside the team's navigation, status 404.
 */
export default function TeamNotFound() {
  return (
    <section className="card plain-page">
      <h1>Not found</h1>
      <p>
        Your team has no such record: the airframe, log or part may have been removed, or the link
        is wrong.
      </p>
      <p className="row">
        <Link href="/">Inspection queue</Link>
        <Link href="/fleet">Fleet</Link>
      </p>
    </section>
  );
}
