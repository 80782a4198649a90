import { route } from '@/server/api/http';
import { getCampaignHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(getCampaignHandler);
