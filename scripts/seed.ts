/**
 * Demo campaign, seeded on first start when the database has no campaign. Everything here is an
 * INVENTED scenario — lab, robot, surfaces and numbers — generated from an invented response model
 * with seeded noise, and labelled as demo data in the app. It is not a measurement of anything.
 *
 * `tsx scripts/seed.ts` seeds only an empty database; `--force` adds the demo campaign regardless.
 * When it seeds, it also creates the demo's admin account with a random password, printed once and
 * written to data/demo-login.txt (mode 0600; SALTUS_DEMO_LOGIN_FILE to put it elsewhere).
 * `--no-demo` seeds nothing. Either way, a database without accounts gets a hint how to add one.
 */
import { randomBytes } from 'node:crypto';
import { chmodSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { randomNormal, seededRandom } from '../src/domain/random';
import { countUsers, createUser } from '../src/server/auth/accounts';
import { closeDb, db } from '../src/server/db/client';
import { fitCampaign } from '../src/server/repos/analyses';
import { createCampaign } from '../src/server/repos/campaigns';
import { commitDesign, listRuns } from '../src/server/repos/runs';
import { placeRuns } from '../src/server/repos/schedule';
import { proposeNextTrial } from '../src/server/repos/suggestions';
import { finishTrial, startTrial } from '../src/server/repos/trials';

const SURFACE_EFFECT: Record<string, { apex: number; eff: number; land: number }> = {
  'turf mat': { apex: -25, eff: -0.3, land: 2 },
  'wet glass': { apex: 15, eff: 0.4, land: -1 },
  'loose soil': { apex: -45, eff: -0.8, land: 6 },
};

/** The invented "true" behaviour of the invented robot, in coded units, with noise. */
function simulate(values: Record<string, string | number>, rng: ReturnType<typeof seededRandom>) {
  const p = (Number(values.payload) - 0.9) / 0.9;
  const g = (Number(values.gain) - 1.25) / 0.75;
  const d = (Number(values.drive) - 1.6) / 0.4;
  const s = SURFACE_EFFECT[String(values.surface)] ?? { apex: 0, eff: 0, land: 0 };
  const apex = 200 + 40 * d - 55 * p + 10 * g - 8 * p * d + s.apex + 8 * randomNormal(rng);
  const efficiency = 3.0 + 0.4 * d - 0.6 * p + 0.3 * g - 0.35 * g * g + s.eff + 0.15 * randomNormal(rng);
  const landing = 18 - 6 * g + 5 * g * g + 3 * p + s.land + 2 * randomNormal(rng);
  return {
    apex_height: Math.round(apex * 10) / 10,
    efficiency: Math.round(efficiency * 100) / 100,
    landing_error: Math.max(0.5, Math.round(landing * 10) / 10),
  };
}

export async function seedDemo(options: { force?: boolean; now?: Date } = {}): Promise<string | null> {
  const client = await db();
  if (!options.force && (await client.campaign.count()) > 0) return null;
  const now = options.now ?? new Date();
  const campaign = await createCampaign(
    {
      name: 'Demo: payload and surface sweep of the Grig-2 hopper',
      objective:
        'INVENTED DEMO DATA. Which of payload, controller gain and actuator drive voltage drive apex height, hop efficiency and landing error of a 0.95 g spring-leg hopper on three surface beds at an invented bench lab?',
      trialMinutes: 20,
      factors: [
        { name: 'surface', kind: 'categorical', unit: '', levels: ['turf mat', 'wet glass', 'loose soil'], hardToChange: true, changeMinutes: 40 },
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8, hardToChange: false, changeMinutes: 0 },
        { name: 'gain', kind: 'continuous', unit: '', low: 0.5, high: 2.0, hardToChange: false, changeMinutes: 0 },
        { name: 'drive', kind: 'continuous', unit: 'kV', low: 1.2, high: 2.0, hardToChange: false, changeMinutes: 0 },
      ],
      responses: [
        { name: 'apex_height', unit: 'mm', goal: 'maximize' },
        { name: 'efficiency', unit: '%', goal: 'maximize' },
        { name: 'landing_error', unit: 'mm', goal: 'minimize' },
      ],
      robots: [
        { name: 'Grig-2 #A', serial: 'DEMO-0001', massGrams: 0.95, heightMm: 45, notes: 'invented demo unit' },
        { name: 'Grig-2 #B', serial: 'DEMO-0002', massGrams: 0.97, heightMm: 45, notes: 'invented demo unit' },
      ],
      rigs: [
        { name: 'Bench 1', timeZone: 'Europe/Berlin', workdays: [1, 2, 3, 4, 5], startTime: '09:00', endTime: '17:00' },
        { name: 'Bench 2', timeZone: 'Europe/Berlin', workdays: [1, 2, 3, 4, 5], startTime: '09:00', endTime: '17:00' },
      ],
    },
    'demo-seed',
    { isDemo: true },
  );
  await commitDesign(campaign.id, { method: 'full-factorial', model: 'interactions', seed: 7 }, 'demo-seed');
  // Last week's work: all runs placed on the rigs a week ago, the first 16 logged at their slot
  // times; the rest re-planned from tomorrow, so the rig pages have a queue.
  const day = (offsetDays: number) => new Date(now.getTime() + offsetDays * 24 * 3600 * 1000).toISOString().slice(0, 10);
  await placeRuns(campaign.id, day(-7), 7, 'demo-seed');
  const placed = (await listRuns(campaign.id)).filter((r) => r.slot).sort((a, b) => a.slot!.start.localeCompare(b.slot!.start));
  const rng = seededRandom(2026);
  for (const [i, run] of placed.slice(0, 16).entries()) {
    const startedAt = new Date(run.slot!.start);
    const { trial } = await startTrial(
      campaign.id,
      { runId: run.id, rigId: run.slot!.rigId, robotId: campaign.robots[i % 2]!.id, operator: 'demo operator', startedAt: startedAt.toISOString() },
      `demo-${campaign.id}-${run.runNumber}`,
      'demo-seed',
      now,
    );
    const obs = simulate(run.values, rng);
    await finishTrial(
      campaign.id,
      trial.id,
      { observations: obs, status: 'done', passed: true, failureReason: '', notes: 'demo data', finishedAt: new Date(startedAt.getTime() + 18 * 60 * 1000).toISOString() },
      'demo-seed',
      now,
    );
  }
  await placeRuns(campaign.id, day(1), 5, 'demo-seed');
  await fitCampaign(campaign.id, 'apex_height', 'main-effects', undefined, 'demo-seed');
  await fitCampaign(campaign.id, 'efficiency', 'main-effects', undefined, 'demo-seed');
  await proposeNextTrial(campaign.id, 'interactions', 1, 'demo-seed');
  return campaign.id;
}

/** The demo's admin account: a random password, printed once and written to a file only its owner can read. */
export async function seedDemoAdmin(file = process.env.SALTUS_DEMO_LOGIN_FILE ?? path.join('data', 'demo-login.txt')): Promise<{ email: string; password: string; file: string }> {
  const email = 'demo-admin@saltus.invalid';
  const password = randomBytes(18).toString('base64url');
  await createUser({ email, name: 'Demo admin', role: 'admin', password }, 'demo-seed');
  mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  writeFileSync(file, `Saltus demo sign-in (created ${new Date().toISOString()})\nemail: ${email}\npassword: ${password}\n`, { mode: 0o600 });
  chmodSync(file, 0o600);
  return { email, password, file };
}

const isMain = process.argv[1] && import.meta.url.endsWith(process.argv[1].split('/').pop()!);
if (isMain) {
  (async () => {
    const noDemo = process.argv.includes('--no-demo');
    const id = noDemo ? null : await seedDemo({ force: process.argv.includes('--force') });
    if (id) {
      console.log(`seeded the demo campaign (invented data): ${id}`);
      const login = await seedDemoAdmin();
      console.log(`demo admin account (shown once; also in ${login.file}, readable only by you):`);
      console.log(`  email:    ${login.email}`);
      console.log(`  password: ${login.password}`);
    } else if (!noDemo) {
      console.log('database already has campaigns; demo not seeded');
    }
    if ((await countUsers()) === 0) {
      console.log('no accounts yet: add one with');
      console.log('  npm run saltus -- user add --email you@lab.example --name "Your Name" --role admin');
    }
    await closeDb();
  })().catch(async (e) => {
    console.error(`seeding failed: ${e instanceof Error ? e.message : String(e)}`);
    await closeDb();
    process.exit(1);
  });
}
