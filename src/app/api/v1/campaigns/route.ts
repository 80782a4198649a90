import { route } from '@/server/api/http';
import { createCampaignHandler, listCampaignsHandler } from '@/server/api/campaign-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(listCampaignsHandler);
export const POST = route(createCampaignHandler);
