import { jsonPost } from '@/server/api/http';
import { handleAnalysisRequest } from '@/server/api/analyses';

export const runtime = 'nodejs';
export const POST = jsonPost(handleAnalysisRequest);
