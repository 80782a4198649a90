import { route } from '@/server/api/http';
import { logTrialHandler } from '@/server/api/rig-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(logTrialHandler);
