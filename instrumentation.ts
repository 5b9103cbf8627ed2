// Runs once when the app server starts (Next.js instrumentation hook): work that would otherwise
// land on the first requests is done here — opening the database (loading its native client
// takes a moment) and starting the site-lookup worker threads (lib/editions/predict-pool.ts).
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { warmUpServer } = await import("@/lib/server-start");
  await warmUpServer();
}
