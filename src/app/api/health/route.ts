import { jsonResponse } from '@/server/api/http';
import { analysisThreadsInUse } from '@/server/compute/triangle-threads';
import { db } from '@/server/db/client';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export async function GET() {
  try {
    const client = await db();
    await client.$queryRawUnsafe('SELECT 1');
    // analysisThreads: threads a large least-squares fit uses (2 once the helper thread has loaded).
    return jsonResponse({ status: 'ok', analysisThreads: analysisThreadsInUse() });
  } catch {
    return jsonResponse({ status: 'error', message: 'the database is not reachable' }, 503);
  }
}
