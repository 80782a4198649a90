import { buildId } from '@/server/build-id';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** GET /api/v1/version: the running build, never cached (the rig page asks to learn of a new deploy). */
export function GET() {
  return Response.json({ buildId: buildId() }, { headers: { 'cache-control': 'no-store' } });
}
