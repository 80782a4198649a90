import { jsonPost } from '@/server/api/http';
import { handleDesignRequest } from '@/server/api/designs';
export const runtime = 'nodejs';
export const POST = jsonPost(handleDesignRequest);
