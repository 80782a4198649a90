import { route } from '@/server/api/http';
import { createTokenHandler, listTokensHandler } from '@/server/api/accounts';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(listTokensHandler);
export const POST = route(createTokenHandler);
