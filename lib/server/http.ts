import "server-only";
import { NextResponse } from "next/server";
import { ServerBusyError, TooManyRequestsError, isDomainError } from "@/lib/errors";

/** API answers are the team's records: no browser or proxy may keep a copy. */
const NO_STORE = { "Cache-Control": "no-store" };

/** Runs a route handler body, mapping domain errors to their status and sentence as JSON. */
export async function jsonRoute(name: string, run: () => Promise<unknown>): Promise<NextResponse> {
  try {
    const body = await run();
    return NextResponse.json(body, { headers: NO_STORE });
  } catch (e) {
    if (isDomainError(e)) {
      const retry: Record<string, string> =
        e instanceof TooManyRequestsError || e instanceof ServerBusyError
          ? { "Retry-After": String(e.retryAfterSeconds) }
          : {};
      return NextResponse.json(
        { error: e.message, code: e.code },
        { status: e.httpStatus, headers: { ...NO_STORE, ...retry } },
      );
    }
    console.error(`route ${name} failed`, e);
    return NextResponse.json(
      { error: "Something went wrong on the server.", code: "internal" },
      { status: 500, headers: NO_STORE },
    );
  }
}
