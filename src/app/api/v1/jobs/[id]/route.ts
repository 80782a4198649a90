import { route } from '@/server/api/http';
import { getJobHandler } from '@/server/api/jobs';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const GET = route(getJobHandler);
