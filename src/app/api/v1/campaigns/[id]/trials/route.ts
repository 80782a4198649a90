import { route } from '@/server/api/http';
import { listTrialsHandler, startTrialHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(listTrialsHandler);
export const POST = route(startTrialHandler);
