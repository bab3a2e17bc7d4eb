import { branchLabels, branchQuestions, causeBranches, type CauseBranch } from './branches';
import { type CautionId, type ProbableCause, causesByDefect, cautionIds, cautionTexts } from './catalogue';

export * from './branches';
export * from './catalogue';

/*
 * The cause-and-effect view of one defect: all six branches, always in the same order (an empty
 * branch is shown as such, so the investigator sees it was considered), plus the cautions that
 * apply to any of its causes.
 */

export interface FishboneBranch {
  branch: CauseBranch;
  label: string;
  question: string;
  causes: ProbableCause[];
}

export interface Fishbone {
  defectCode: string;
  branches: FishboneBranch[];
  cautions: { id: CautionId; text: string }[];
}

export function probableCauses(defectCode: string): readonly ProbableCause[] {
  return causesByDefect[defectCode] ?? [];
}

export function hasProbableCauses(defectCode: string): boolean {
  return probableCauses(defectCode).length > 0;
}

/**
 * `critical` adds the quarantine caution first: for those defects the product is secured before
 * anyone starts looking for causes.
 */
export function fishboneFor(defectCode: string, options: { critical?: boolean } = {}): Fishbone {
  const list = probableCauses(defectCode);
  const wanted = new Set<CautionId>(list.flatMap((c) => c.cautions));
  if (options.critical) wanted.add('quarantine');
  return {
    defectCode,
    branches: causeBranches.map((branch) => ({
      branch,
      label: branchLabels[branch],
      question: branchQuestions[branch],
      causes: list.filter((c) => c.branch === branch),
    })),
    cautions: cautionIds
      .filter((id) => wanted.has(id))
      .map((id) => ({ id, text: cautionTexts[id] })),
  };
}
