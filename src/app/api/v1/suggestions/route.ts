import { jsonPost } from '@/server/api/http';
import { handleSuggestionRequestOffThread } from '@/server/api/suggestions';

export const runtime = 'nodejs';
export const POST = jsonPost(handleSuggestionRequestOffThread);
