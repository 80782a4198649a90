import { jsonResponse } from '@/server/api/http';
import { db } from '@/server/db/client';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export async function GET() {
  try {
    const client = await db();
    await client.$queryRawUnsafe('SELECT 1');
    return jsonResponse({ status: 'ok' });
  } catch {
    return jsonResponse({ status: 'error', message: 'the database is not reachable' }, 503);
  }
}
