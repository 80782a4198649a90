import { route } from '@/server/api/http';
import { daySheetHandler } from '@/server/api/plan-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(daySheetHandler);
