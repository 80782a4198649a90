import { route } from '@/server/api/http';
import { importTrialsHandler } from '@/server/api/rig-handlers';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';
export const POST = route(importTrialsHandler);
