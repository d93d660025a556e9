// Runs once when the server starts: makes the client address trustworthy for sign-in throttling
// (lib/server/trust-proxy.ts), and picks up analyses left pending by a stop.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  if (process.env.HEATCHECK_TRUST_PROXY !== "1") {
    const { dropClientForwardedFor } = await import("@/lib/server/trust-proxy");
    dropClientForwardedFor();
  }
  const { resumePendingAnalyses } = await import("@/lib/server/analysis-jobs");
  const n = await resumePendingAnalyses();
  if (n > 0) console.log(`heatcheck: resumed ${n} pending analyses`);
}
