import "server-only";
import http from "node:http";

/**
 * `next start` fills X-Forwarded-For from the socket only when the request has none, so a client
 * could name any address of its own and dodge the per-address sign-in throttle. Without a trusted
 * reverse proxy in front (HEATCHECK_TRUST_PROXY=1), the header is dropped as each request arrives
 * and Next then writes the socket's address. Installed once, from instrumentation.ts.
 */
export function dropClientForwardedFor(): void {
  // Unbound on purpose: it is called below with the server that emits as `this`.
  const emit: (this: unknown, event: string, ...args: unknown[]) => boolean =
    // eslint-disable-next-line @typescript-eslint/unbound-method
    http.Server.prototype.emit;
  http.Server.prototype.emit = function (
    this: unknown,
    event: string,
    ...args: unknown[]
  ): boolean {
    const req = args[0];
    if (event === "request" && req instanceof http.IncomingMessage)
      delete req.headers["x-forwarded-for"];
    return emit.call(this, event, ...args);
  };
}
