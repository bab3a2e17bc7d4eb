import { count, inArray } from 'drizzle-orm';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { closeDb, db } from '../../db/client';
import { settings, users } from '../../db/schema';
import { planDemoCapas, capaSteps } from './capas';
import { complaintSteps, planDemoComplaints } from './complaints';
import { buildDemoDeviations } from './deviations';
import { demoSeedState, seedCompletedKey, seedStartedKey } from './markers';
import { batchSteps, loadMasterData, loadPeople, ringSteps, writeSeedSetting } from './master-data';
import { deviationSteps, lotsHeldByDeviations } from './play-deviations';
import { buildDemoScenario } from './scenario';
import { SeedContext, tellStories } from './story';
import { weightCheckSteps } from './weight';

export { seedAuditAction } from './master-data';

/*
 * Loads the Brackwater Capsule Co. demo into an empty database through the product's own write
 * path: the same commands, rules, history, audit entries and signatures as people's work, each step
 * at the time its story gives. It connects as the application (DATABASE_URL), so it can do nothing
 * the app could not. Run: npm run db:seed.
 *
 * It runs as many transactions, not one, so it marks its progress in two settings rows
 * (./markers.ts): a database seeded half-way is recognised, and the start script loads it again
 * from scratch instead of showing a demo with half its stories.
 */

export class SeedRefusedError extends Error {
  constructor(reason: string) {
    super(`${reason} The demo is only loaded into an empty database; nothing was changed. To start over, drop and re-create the database, run the migrations, then seed again.`);
    this.name = 'SeedRefusedError';
  }
}

const isDuplicateKey = (err: unknown) =>
  ((err as { cause?: { errno?: number } })?.cause?.errno ?? (err as { errno?: number })?.errno) === 1062;

async function assertEmpty(): Promise<void> {
  const [row] = await db.select({ n: count() }).from(users);
  const keys = new Set(
    (await db.select({ key: settings.key }).from(settings).where(inArray(settings.key, [seedStartedKey, seedCompletedKey]))).map((s) => s.key),
  );
  const state = demoSeedState(row?.n ?? 0, keys);
  if (state === 'partial') throw new SeedRefusedError('A demo seed started on this database and did not finish.');
  if (state !== 'empty') throw new SeedRefusedError(`The database already has ${row?.n ?? 0} user(s).`);
}

export interface SeedReport {
  steps: number;
  seconds: number;
  /** Demo passwords checked for signatures (bcrypt, so the seed checks each as seldom as it may). */
  passwordChecks: number;
}

export async function seedDemo(): Promise<SeedReport> {
  const started = performance.now();
  // Planned first and purely: a story the rules would refuse fails here, before anything is written.
  const scenario = buildDemoScenario();
  const deviations = buildDemoDeviations(scenario);
  const capas = planDemoCapas(deviations);
  const complaints = planDemoComplaints(scenario, deviations);

  await assertEmpty();
  try {
    await writeSeedSetting(seedStartedKey, new Date().toISOString(), 'demo_seed_started');
  } catch (err) {
    // Another seed took the database a moment ago (the key is the settings table's primary key).
    if (isDuplicateKey(err)) throw new SeedRefusedError('Another demo seed is loading this database.');
    throw err;
  }

  const ctx = new SeedContext();
  await loadPeople(ctx, scenario);
  await loadMasterData(ctx, scenario);
  const steps = [
    ...batchSteps(scenario, lotsHeldByDeviations(deviations)),
    ...ringSteps(scenario),
    ...deviationSteps(deviations),
    ...capaSteps(capas),
    ...complaintSteps(complaints),
    ...weightCheckSteps(scenario),
  ];
  await tellStories(ctx, steps);

  await writeSeedSetting(seedCompletedKey, new Date().toISOString(), 'demo_seed_completed');
  return { steps: steps.length, seconds: (performance.now() - started) / 1000, passwordChecks: ctx.signerChecks };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  seedDemo()
    .then((r) => console.log(`demo data loaded (Brackwater Capsule Co.): ${r.steps} steps in ${r.seconds.toFixed(1)} s`))
    .catch((err: unknown) => {
      console.error(err instanceof Error ? err.message : err);
      process.exitCode = 1;
    })
    .finally(() => closeDb());
}
