/**
 * Runs once when the Next.js server starts: the job runner recovers jobs a stopped server left behind
 * and, with PostgreSQL, begins taking jobs from the shared queue even before this server's first request.
 */
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const [{ startedJobRunner }, { pool }, { startAnalysisThreads }] = await Promise.all([
    import('./server/jobs'),
    import('./server/jobs/pool'),
    import('./server/compute/triangle-threads'),
  ]);
  // Load one worker thread now, so the first computation does not wait for it, and the helper that
  // shares large least-squares fits with the request's thread.
  pool();
  void startAnalysisThreads();
  startedJobRunner().catch((e: unknown) => console.error('[saltus] the job runner did not start; it will try again on the next job', e));
}
