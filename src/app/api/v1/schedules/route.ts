import { jsonPost } from '@/server/api/http';
import { handleScheduleRequest } from '@/server/api/schedules';
export const runtime = 'nodejs';
export const POST = jsonPost(handleScheduleRequest);
