import { route } from '@/server/api/http';
import { cancelJobHandler } from '@/server/api/jobs';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(cancelJobHandler);
