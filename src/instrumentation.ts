/**
 * Runs once when the Next.js server starts: the job runner recovers jobs a stopped server left behind
 * and, with PostgreSQL, begins taking jobs from the shared queue even before this server's first request.
 */
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { startedJobRunner } = await import('./server/jobs');
  startedJobRunner().catch((e: unknown) => console.error('[saltus] the job runner did not start; it will try again on the next job', e));
}
