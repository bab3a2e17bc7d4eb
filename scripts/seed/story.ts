import { recordedAt } from '../../lib/clock';
import { ValidationError } from '../../lib/errors';
import type { RecordActor } from '../../lib/records/kind';
import { type VerifiedSigner, verifySigner } from '../../lib/signatures';
import { demoPassword } from './demo-users';

/*
 * How the demo's stories are told: every step is a call to the command a person would use, made
 * inside recordedAt(the step's time), so the write path stamps history, audit entries, signatures
 * and the records' own columns with the story's date. The steps of every story (deviations, CAPAs,
 * complaints, rings, batches, weight checks) are merged into one timeline and run in the order they
 * happened, so the record counters give DEV, CAPA and CMP numbers in the order the site would have,
 * and every rule sees the records as they stood at that moment.
 */

export interface DemoPerson extends RecordActor {
  email: string;
  title: string;
}

export interface StoryStep {
  /** ISO 8601, UTC. */
  at: string;
  /** What the step is, for the error message when the product refuses it. */
  what: string;
  run(ctx: SeedContext): Promise<void>;
}

/** A record the steps move on: its id and the version the next step must name. */
export interface Tracked {
  id: number;
  version: number;
}

/*
 * verifySigner's proof is good for 60 s of real time (lib/signatures); the seed checks each demo
 * password once and again only when its proof is close to that age, since bcrypt is slow on purpose.
 */
const signerReuseMs = 50_000;

export class SeedContext {
  readonly people = new Map<string, DemoPerson>();
  readonly productIds = new Map<string, number>();
  readonly machineIds = new Map<string, number>();
  readonly ringIds = new Map<string, number>();
  readonly batchIds = new Map<string, number>();
  readonly defectIds = new Map<string, number>();
  /** Records by "deviation:<story key>", "capa:<story key>", "complaint:<story key>", "ring:<serial>". */
  private readonly records = new Map<string, Tracked>();
  /** Numbers the product gave (DEV-2026-0001 ...), by the same keys. */
  readonly numbers = new Map<string, string>();
  /** CAPA action ids and versions, by "<capa key>:<round>:<index>". */
  readonly actions = new Map<string, Tracked>();
  private readonly signers = new Map<number, VerifiedSigner>();
  /** How many passwords were checked, for the timing line the seed prints. */
  signerChecks = 0;

  person(email: string): DemoPerson {
    const p = this.people.get(email);
    if (!p) throw new Error(`demo user ${email} is missing`);
    return p;
  }

  id(map: Map<string, number>, key: string, what: string): number {
    const id = map.get(key);
    if (id === undefined) throw new Error(`demo ${what} ${key} is missing`);
    return id;
  }

  track(key: string, record: Tracked): void {
    this.records.set(key, { id: record.id, version: record.version });
  }

  record(key: string): Tracked {
    const r = this.records.get(key);
    if (!r) throw new Error(`demo record ${key} has not been created yet`);
    return r;
  }

  number(key: string): string {
    const n = this.numbers.get(key);
    if (!n) throw new Error(`demo record ${key} has no number yet`);
    return n;
  }

  /** A fresh enough proof that this demo user entered their password (21 CFR 11.200(a)). */
  async signer(email: string): Promise<{ signer: VerifiedSigner }> {
    const person = this.person(email);
    const cached = this.signers.get(person.id);
    if (cached && Date.now() - cached.verifiedAt < signerReuseMs) return { signer: cached };
    const fresh = await verifySigner(person.id, demoPassword);
    this.signerChecks++;
    this.signers.set(person.id, fresh);
    return { signer: fresh };
  }
}

function describe(err: unknown): string {
  if (err instanceof ValidationError && Object.keys(err.fieldErrors).length > 0) {
    return `${err.message} ${JSON.stringify(err.fieldErrors)}`;
  }
  return err instanceof Error ? err.message : String(err);
}

/** Runs the steps in the order they happened (ties in the order given), each at its own time. */
export async function tellStories(ctx: SeedContext, steps: readonly StoryStep[]): Promise<void> {
  const ordered = steps
    .map((step, index) => ({ step, index, at: Date.parse(step.at) }))
    .sort((a, b) => a.at - b.at || a.index - b.index);
  for (const { step, at } of ordered) {
    if (Number.isNaN(at)) throw new Error(`demo step "${step.what}" has no valid time (${step.at})`);
    try {
      await recordedAt(new Date(at), () => step.run(ctx));
    } catch (err) {
      throw new Error(`demo step "${step.what}" at ${step.at} was refused: ${describe(err)}`, { cause: err });
    }
  }
}

/** A step at a moment given as 'YYYY-MM-DDTHH:MM' or a full ISO string. */
export function iso(moment: string): string {
  return moment.length === 16 ? `${moment}:00.000Z` : new Date(moment).toISOString();
}
