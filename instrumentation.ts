// Runs once when the server starts: the data folder made private and swept, pending analyses
// re-queued, a bounded shutdown armed (lib/server/startup.ts).
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { startServer } = await import("@/lib/server/startup");
  await startServer();
}
