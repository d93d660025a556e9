// Runs once when the server starts: makes the client address trustworthy for sign-in throttling,
// and picks up analyses left pending by a stop.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  if (process.env.HEATCHECK_TRUST_PROXY !== "1") {
    // `next start` fills X-Forwarded-For from the socket only when the request has none, so a
    // client could name any address of its own. Without a trusted reverse proxy in front, the
    // header is dropped as each request arrives and Next then writes the socket's address.
    const http = await import("node:http");
    const emit: (this: unknown, event: string, ...args: unknown[]) => boolean = http.Server.prototype.emit;
    http.Server.prototype.emit = function (this: unknown, event: string, ...args: unknown[]): boolean {
      const req = args[0];
      if (event === "request" && req instanceof http.IncomingMessage) delete req.headers["x-forwarded-for"];
      return emit.call(this, event, ...args);
    };
  }
  const { resumePendingAnalyses } = await import("@/lib/server/analysis-jobs");
  const n = await resumePendingAnalyses();
  if (n > 0) console.log(`heatcheck: resumed ${n} pending analyses`);
}
