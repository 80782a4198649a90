import { route } from '@/server/api/http';
import { weekGridHandler } from '@/server/api/plan-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(weekGridHandler);
