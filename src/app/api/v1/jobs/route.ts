import { route } from '@/server/api/http';
import { createJobHandler, listJobsHandler } from '@/server/api/jobs';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(createJobHandler);
export const GET = route(listJobsHandler);
