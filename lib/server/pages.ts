import "server-only";
import { notFound } from "next/navigation";
import { NotFoundError } from "@/lib/errors";

/**
 * For a page: an id from the URL that is unknown, or another team's, shows the not-found screen
 * with status 404 (app/not-found.tsx) instead of failing the whole page.
 */
export async function orNotFound<T>(lookup: Promise<T>): Promise<T> {
  try {
    return await lookup;
  } catch (e) {
    if (e instanceof NotFoundError) notFound();
    throw e;
  }
}
