import { route } from '@/server/api/http';
import { getTrialHandler } from '@/server/api/rig-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(getTrialHandler);
