import { readJson, route } from '@/server/api/http';
import { loginHandler } from '@/server/auth/login';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(async (req: Request) => loginHandler(req, await readJson(req, 64 * 1024)));
