import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import { db, type DbOrTx, type Tx } from '../../db/client';
import { signatures, users } from '../../db/schema';
import { writeAudit } from '../audit';
import { canonicalJson, sqlUtc } from '../audit/hash';
import { verifySignaturePassword } from '../auth/credentials';
import { roleLabels } from '../auth/roles';
import { ValidationError } from '../errors';
import type { RecordType } from '../records/types';
import { now } from '../clock';
import { changedSignatureParts, signatureContentHash, signatureManifestHash, signaturePartHashes } from './hash';
import { type SignatureMeaning, isSignatureMeaning, signatureMeaningLabels } from './meanings';

export { signatureContentHash, signatureManifestHash, signaturePartHashes } from './hash';
export * from './meanings';

/*
 * Electronic signatures (21 CFR 11.50, 11.70, 11.200(a)). Signing takes two steps:
 *
 * 1. verifySigner(userId, password), outside any transaction. The password check runs in a
 *    transaction of its own, so a wrong password is counted toward the lock-out and audited even
 *    though nothing gets signed, and it never waits on locks the signing transaction holds.
 * 2. sign(tx, signer, ...) inside the transaction that changes the record, so the signature, the
 *    change and their audit entries commit or roll back together.
 *
 * A VerifiedSigner can only come from verifySigner and is good for a short while, so no code path
 * can sign without a fresh password entry.
 */

export interface VerifiedSigner {
  readonly userId: number;
  readonly verifiedAt: number;
}

const issued = new WeakSet<VerifiedSigner>();
/** Long enough for the signing transaction, short enough that a proof cannot be kept for later. */
const signerProofLifetimeMs = 60_000;

/** Re-checks the password (both signature components, 11.200(a)(1)). Throws ValidationError on `password`. */
export async function verifySigner(userId: number, password: string | null | undefined): Promise<VerifiedSigner> {
  await verifySignaturePassword(userId, password ?? '');
  const signer = Object.freeze({ userId, verifiedAt: Date.now() });
  issued.add(signer);
  return signer;
}

export interface SignInput {
  recordType: RecordType;
  recordId: number;
  /** The version of the record being signed, as it stands in this transaction. */
  recordVersion: number;
  /**
   * What the signature covers, as the record kind declares it for this meaning, read after any
   * update so types match later reads. Each top-level key is a part (the facts, the investigation,
   * the evidence ...) that a later mismatch can name.
   */
  content: Record<string, unknown>;
  meaning: SignatureMeaning;
  reason?: string | null;
}

export interface SignatureDto {
  id: number;
  userId: number;
  printedName: string;
  printedTitle: string;
  /** One of signatureMeanings; kept as stored so a tampered value shows instead of being hidden. */
  meaning: string;
  meaningLabel: string;
  /** ISO 8601, UTC. */
  signedAt: string;
  recordVersion: number;
  /** False when the record's content now differs from what was signed: "record changed after signing". */
  matches: boolean;
  /**
   * When it no longer matches: the parts it covered that changed, in the record kind's words (empty
   * for signatures made before parts were kept). Parts the record gained later do not count.
   */
  changedParts: string[];
  /** A later signature of the same meaning on the same record (after a rework or a reopen), or null. */
  supersededBy: number | null;
  /** False when the stored manifestation (name, title, meaning, time) no longer matches its hash. */
  intact: boolean;
}

export async function sign(tx: Tx, signer: VerifiedSigner, input: SignInput): Promise<SignatureDto> {
  if (!issued.has(signer)) throw new Error('sign() needs a VerifiedSigner from verifySigner()');
  if (Date.now() - signer.verifiedAt > signerProofLifetimeMs) {
    const message = 'Your password check has expired. Enter your password again to sign.';
    throw new ValidationError(message, { password: [message] });
  }
  if (!isSignatureMeaning(input.meaning)) throw new Error(`unknown signature meaning ${String(input.meaning)}`);

  const [user] = await tx
    .select({ id: users.id, name: users.name, title: users.title, role: users.role, active: users.active })
    .from(users)
    .where(eq(users.id, signer.userId));
  if (!user || !user.active) throw new ValidationError('Your account is deactivated.', { password: ['Your account is deactivated.'] });

  const contentHash = signatureContentHash(input.recordType, input.recordId, input.recordVersion, input.content);
  const partHashes = signaturePartHashes(input.recordType, input.recordId, input.recordVersion, input.content);
  const contentParts = canonicalJson(partHashes);
  const manifest = {
    recordType: input.recordType,
    recordId: input.recordId,
    recordVersion: input.recordVersion,
    userId: user.id,
    printedName: user.name,
    printedTitle: user.title || roleLabels[user.role],
    meaning: input.meaning,
    signedAt: sqlUtc(now()),
    contentHash,
    contentParts,
  };
  const [row] = await tx
    .insert(signatures)
    .values({ ...manifest, signatureHash: signatureManifestHash(manifest) })
    .$returningId();
  const id = row!.id;
  await writeAudit(tx, {
    actor: { id: user.id, name: user.name },
    recordType: input.recordType,
    recordId: input.recordId,
    action: 'signed',
    changes: [
      {
        field: 'signature',
        from: null,
        to: { id, meaning: input.meaning, recordVersion: input.recordVersion, contentHash },
      },
    ],
    reason: input.reason ?? null,
  });
  return toDto({ id, ...manifest, signatureHash: signatureManifestHash(manifest) }, { contentHash, parts: partHashes }, {}, null);
}

/** verifySigner + sign in a transaction of their own, for a signature that changes nothing else. */
export async function signWithPassword(
  userId: number,
  password: string | null | undefined,
  input: SignInput,
): Promise<SignatureDto> {
  const signer = await verifySigner(userId, password);
  return db.transaction((tx) => sign(tx, signer, input));
}

type SignatureRow = typeof signatures.$inferSelect;

interface CurrentContent {
  contentHash: string;
  parts: Record<string, string>;
}

function parseParts(text: string | null): Record<string, string> | null {
  if (!text) return null;
  try {
    const parsed = JSON.parse(text) as unknown;
    return parsed && typeof parsed === 'object' ? (parsed as Record<string, string>) : null;
  } catch {
    return null;
  }
}

/** "actions:round 2" reads as the kind's words for "actions" followed by "(round 2)". */
function partLabel(part: string, labels: Record<string, string>): string {
  const [base, detail] = part.split(':', 2) as [string, string | undefined];
  const words = labels[base] ?? base.replace(/_/g, ' ');
  return detail ? `${words} (${detail})` : words;
}

function toDto(
  row: SignatureRow,
  current: CurrentContent,
  partLabels: Record<string, string>,
  supersededBy: number | null,
): SignatureDto {
  const meaning = isSignatureMeaning(row.meaning) ? row.meaning : null;
  const { id: _id, signatureHash, ...manifest } = row;
  const signedParts = parseParts(row.contentParts);
  // A signature vouches for the parts it covered: those must be unchanged (a part that is gone counts
  // as changed). Parts the record gained since (a later round of actions) are a later signature's.
  const changed = signedParts ? changedSignatureParts(signedParts, current.parts).filter((part) => part in signedParts) : [];
  const matches = signedParts ? changed.length === 0 : row.contentHash === current.contentHash;
  return {
    id: row.id,
    userId: row.userId,
    printedName: row.printedName,
    printedTitle: row.printedTitle,
    meaning: row.meaning,
    meaningLabel: meaning ? signatureMeaningLabels[meaning] : `Unknown meaning "${row.meaning}"`,
    signedAt: `${row.signedAt.replace(' ', 'T')}Z`,
    recordVersion: row.recordVersion,
    matches,
    changedParts: changed.map((part) => partLabel(part, partLabels)),
    supersededBy,
    intact: meaning !== null && signatureManifestHash(manifest) === signatureHash,
  };
}

/**
 * What the record holds now, for one signature meaning: the content the record kind says that
 * meaning covers (lib/records declares it), or null for a meaning the kind does not sign.
 */
export type CurrentSignedContent = (meaning: string) => Record<string, unknown> | null;

/**
 * The record's signatures, oldest first, each compared with what the record holds now for its
 * meaning: the hash is recomputed for the version the signature names, so only a change of content
 * (not the version counter alone) makes it stop matching, and the changed parts are named.
 */
export async function listSignatures(
  dbOrTx: DbOrTx,
  recordType: RecordType,
  recordId: number,
  currentContent: CurrentSignedContent,
  partLabels: Record<string, string> = {},
): Promise<SignatureDto[]> {
  const rows = await dbOrTx
    .select()
    .from(signatures)
    .where(and(eq(signatures.recordType, recordType), eq(signatures.recordId, recordId)))
    .orderBy(asc(signatures.id));
  return rows.map((r) => {
    const content = currentContent(r.meaning) ?? {};
    const later = rows.find((o) => o.id > r.id && o.meaning === r.meaning);
    return toDto(
      r,
      {
        contentHash: signatureContentHash(recordType, recordId, r.recordVersion, content),
        parts: signaturePartHashes(recordType, recordId, r.recordVersion, content),
      },
      partLabels,
      later?.id ?? null,
    );
  });
}
