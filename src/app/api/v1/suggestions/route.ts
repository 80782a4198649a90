import { jsonPost } from '@/server/api/http';
import { handleSuggestionRequest } from '@/server/api/suggestions';

export const runtime = 'nodejs';
export const POST = jsonPost(handleSuggestionRequest);
