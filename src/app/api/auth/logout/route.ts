import { route } from '@/server/api/http';
import { logoutHandler } from '@/server/auth/login';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(logoutHandler);
