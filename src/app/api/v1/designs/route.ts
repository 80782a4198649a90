import { jsonPost } from '@/server/api/http';
import { handleDesignRequestOffThread } from '@/server/api/designs';
export const runtime = 'nodejs';
export const POST = jsonPost(handleDesignRequestOffThread);
