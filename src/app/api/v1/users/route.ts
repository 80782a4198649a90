import { route } from '@/server/api/http';
import { createUserHandler, listUsersHandler } from '@/server/api/accounts';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(listUsersHandler);
export const POST = route(createUserHandler);
