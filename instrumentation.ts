// Runs once when the server starts: makes the client address trustworthy for sign-in throttling
// (lib/server/trust-proxy.ts), then the data folder made private and swept, pending analyses
// re-queued, a bounded shutdown armed (lib/server/startup.ts).
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { config } = await import("@/lib/config");
  if (!config().trustProxy) {
    const { dropClientForwardedFor } = await import("@/lib/server/trust-proxy");
    dropClientForwardedFor();
  }
  const { startServer } = await import("@/lib/server/startup");
  await startServer();
}
