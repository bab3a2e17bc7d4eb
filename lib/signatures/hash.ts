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

/**
 * One hash per top-level part of the signed content (the facts, the investigation, the actions, the
 * evidence ...), each bound to the same address as the whole. Kept with the signature so that a
 * signature that no longer matches can say which part changed, without keeping the content itself.
 */
export function signaturePartHashes(
  recordType: string,
  recordId: number,
  recordVersion: number,
  content: Record<string, unknown>,
): Record<string, string> {
  return Object.fromEntries(
    Object.keys(content)
      .sort()
      .map((part) => [part, sha256Hex(canonicalJson({ recordType, recordId, recordVersion, part, value: content[part] }))]),
  );
}

/** The parts whose hash differs, or that one side has and the other not, in name order. */
export function changedSignatureParts(signed: Record<string, string>, current: Record<string, string>): string[] {
  const names = [...new Set([...Object.keys(signed), ...Object.keys(current)])].sort();
  return names.filter((name) => signed[name] !== current[name]);
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
  /** Canonical JSON of the part hashes (signaturePartHashes); absent on signatures made before parts. */
  contentParts?: string | null;
}

/** Links the manifestation to the content hash: editing the name, meaning or time shows up. */
export function signatureManifestHash(manifest: SignatureManifest): string {
  const { contentParts, ...rest } = manifest;
  return sha256Hex(canonicalJson(contentParts ? { ...rest, contentParts } : rest));
}
