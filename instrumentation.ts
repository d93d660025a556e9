// Runs once when the server starts: picks up analyses left pending by a stop.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { resumePendingAnalyses } = await import("@/lib/server/analysis-jobs");
  const n = await resumePendingAnalyses();
  if (n > 0) console.log(`heatcheck: resumed ${n} pending analyses`);
}
