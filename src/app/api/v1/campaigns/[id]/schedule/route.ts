import { route } from '@/server/api/http';
import { listSlotsHandler, scheduleHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(listSlotsHandler);
export const POST = route(scheduleHandler);
