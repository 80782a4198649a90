import { route } from '@/server/api/http';
import { buildId } from '@/server/build-id';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** GET /api/v1/version: the running build, never cached (the rig page asks to learn of a new deploy). */
export const GET = route(async () => ({ buildId: buildId() }));
