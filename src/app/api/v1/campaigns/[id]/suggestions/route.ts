import { route } from '@/server/api/http';
import { suggestionBatchHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(suggestionBatchHandler);
