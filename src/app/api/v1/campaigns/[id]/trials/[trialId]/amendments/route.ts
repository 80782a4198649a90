import { route } from '@/server/api/http';
import { amendTrialHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(amendTrialHandler);
