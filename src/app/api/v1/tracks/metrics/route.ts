import { errorResponse, jsonResponse, readText } from '@/server/api/http';
import { MAX_TRACK_BYTES, handleTrackMetrics } from '@/server/api/tracks';

export const runtime = 'nodejs';

export async function POST(req: Request): Promise<Response> {
  try {
    const csv = await readText(req, MAX_TRACK_BYTES);
    return jsonResponse(handleTrackMetrics(csv, new URL(req.url).searchParams));
  } catch (e) {
    return errorResponse(e);
  }
}
