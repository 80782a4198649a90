import { route, readText } from '@/server/api/http';
import { MAX_TRACK_BYTES, handleTrackMetrics } from '@/server/api/tracks';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const POST = route(async (req: Request) => handleTrackMetrics(await readText(req, MAX_TRACK_BYTES), new URL(req.url).searchParams));
