import { route } from '@/server/api/http';
import { meHandler } from '@/server/auth/login';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(async (_req: Request, _p: Record<string, string>, caller) => meHandler(caller));
