import { route } from '@/server/api/http';
import { revokeTokenHandler } from '@/server/api/accounts';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(revokeTokenHandler);
