import { route } from '@/server/api/http';
import { disableUserHandler } from '@/server/api/accounts';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(disableUserHandler);
