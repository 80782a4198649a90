import { route } from '@/server/api/http';
import { moveHandler } from '@/server/api/plan-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(moveHandler);
