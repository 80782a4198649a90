import { route } from '@/server/api/http';
import { addRunHandler, listRunsHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(listRunsHandler);
export const POST = route(addRunHandler);
