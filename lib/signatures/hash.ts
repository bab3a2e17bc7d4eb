import { canonicalJson, sha256Hex } from '../audit/hash';

/*
 * Hashes that bind an electronic signature to what was signed (21 CFR 11.70: signatures are linked
 * to their records so they cannot be excised, copied or transferred to falsify a record). Pure.
 */

/**
 * SHA-256 over the canonical JSON of the signed content and its address (record type, id and the
 * version that was signed), so a hash cannot be moved to another record. `content` is the record's
 * GMP fields, never volatile columns such as updated_at.
 */
export function signatureContentHash(
  recordType: string,
  recordId: number,
  recordVersion: number,
  content: Record<string, unknown>,
): string {
  return sha256Hex(canonicalJson({ recordType, recordId, recordVersion, content }));
}

/** Everything the signature manifests (21 CFR 11.50(a)): who, printed name and title, when, meaning, and what. */
export interface SignatureManifest {
  recordType: string;
  recordId: number;
  recordVersion: number;
  userId: number;
  printedName: string;
  printedTitle: string;
  meaning: string;
  /** UTC, 'YYYY-MM-DD HH:MM:SS.mmm', exactly as stored. */
  signedAt: string;
  contentHash: string;
}

/** Links the manifestation to the content hash: editing the name, meaning or time shows up. */
export function signatureManifestHash(manifest: SignatureManifest): string {
  return sha256Hex(canonicalJson(manifest));
}
