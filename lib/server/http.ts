import "server-only";
import { NextResponse } from "next/server";
import { TooManyRequestsError, isDomainError } from "@/lib/errors";

/** Runs a route handler body, mapping domain errors to their status and sentence as JSON. */
export async function jsonRoute(name: string, run: () => Promise<unknown>): Promise<NextResponse> {
  try {
    const body = await run();
    return NextResponse.json(body);
  } catch (e) {
    if (isDomainError(e)) {
      const headers: Record<string, string> = e instanceof TooManyRequestsError ? { "Retry-After": String(e.retryAfterSeconds) } : {};
      return NextResponse.json({ error: e.message, code: e.code }, { status: e.httpStatus, headers });
    }
    console.error(`route ${name} failed`, e);
    return NextResponse.json({ error: "Something went wrong on the server.", code: "internal" }, { status: 500 });
  }
}
