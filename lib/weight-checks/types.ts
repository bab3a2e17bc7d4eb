import type { WeightEvaluation, WeightMethod } from '../weight/evaluate';

/* DTOs of the weight-check screens and API; plain data, safe to pass to client components. */

export interface WeightBatchDto {
  id: number;
  lotNumber: string;
  status: 'in_process' | 'on_hold' | 'released' | 'rejected';
  manufacturedOn: string;
  product: {
    id: number;
    code: string;
    name: string;
    strength: string;
    capsuleSize: '000' | '00' | '0' | '1' | '2' | '3' | '4' | '5';
    regulatoryClass: 'supplement' | 'drug';
    targetFillMg: number;
    fillLowerMg: number;
    fillUpperMg: number;
  };
  machine: { id: number; assetTag: string; name: string } | null;
  ring: { id: number; serial: string } | null;
}

export interface WeightCheckDto {
  id: number;
  batchId: number;
  method: WeightMethod;
  massMode: 'gross' | 'net';
  shellMassMg: number | null;
  /** As entered (gross or net). */
  massesMg: number[];
  /** Content masses: as entered less the shell mass when gross. */
  netMassesMg: number[];
  sampleSize: number;
  meanMg: number;
  sdMg: number;
  minMg: number;
  maxMg: number;
  outOfLimitCount: number;
  verdict: 'pass' | 'fail';
  note: string | null;
  recordedBy: { id: number; name: string };
  /** ISO 8601, UTC. */
  checkedAt: string;
}

export interface RecordedWeightCheck {
  check: WeightCheckDto;
  evaluation: WeightEvaluation;
}

/** Batches still being made take in-process checks; released or rejected ones are closed. */
export const batchStatusesTakingChecks = ['in_process', 'on_hold'] as const;
