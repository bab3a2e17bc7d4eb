import { randomBytes } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { attachments, auditEntries, capaActions, deviations } from '@/db/schema';
import { uploadAttachment } from '@/lib/attachments/commands';
import { getAttachRefusal, getDownloadLink, listAttachments } from '@/lib/attachments/queries';
import { addAction, approvePlan, cancelCapa, completeAction, createCapa, openEffectivenessCheck, recordEffective, startImplementation, updatePlan } from '@/lib/capa/commands';
import { evidenceEmptyMessage } from '@/lib/capa/evidence-text';
import { ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '@/lib/errors';
import { ensureBucket } from '@/lib/storage';
import { pdf, tinyPng } from '../../unit/attachments/sample-files';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * Evidence of completion of CAPA actions: the rich text written when an action is recorded as done,
 * and files attached to the CAPA, against MariaDB and the S3-compatible fake of the test stack.
 * Sources: 21 CFR 820.100(a)(7) (CAPA activities and their results documented), 21 CFR 11.10(e)
 * (audit trail of every change, the value as saved), 21 CFR 11.10(d) and EU GMP Annex 11 §12.1
 * (access limited to authorised people), EU GMP Annex 11 §9 (no change after the decision), and
 * common practice where noted.
 */

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
const dayMs = 86_400_000;
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

beforeAll(async () => {
  await ensureBucket();
});
afterAll(closeDb);

const auditOf = (id: number, action: string) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'capa'), eq(auditEntries.recordId, id), eq(auditEntries.action, action)))
    .orderBy(asc(auditEntries.id));

async function makeDeviation(raisedBy: number): Promise<number> {
  const [row] = await db
    .insert(deviations)
    .values({
      number: `DEV-IT-${unique()}`.slice(0, 20),
      status: 'closed',
      title: 'Split caps after a lot change (evidence test)',
      whatHappened: 'Split caps after the gelatin lot changed on the test filler.',
      raisedBy,
      occurredAt: new Date(Date.now() - 30 * dayMs),
      rootCause: 'The new lot was not checked before restart.',
      capaRequired: true,
    })
    .$returningId();
  return row!.id;
}

/** A CAPA in implementation with one action, owned by an operator. */
async function inImplementation() {
  const [owner, approver, actionOwner, otherOperator, supervisor, otherQa] = await Promise.all([
    makeUser('qa_investigator'),
    makeUser('qa_approver'),
    makeUser('operator'),
    makeUser('operator'),
    makeUser('supervisor'),
    makeUser('qa_investigator'),
  ]);
  const created = await createCapa(owner, {
    title: 'Check every new gelatin lot before restart',
    sourceType: 'deviation',
    sourceId: await makeDeviation(actionOwner.id),
    problemStatement: 'Split caps follow lot changes that were not checked.',
    ownerId: owner.id,
  });
  let r = created.record;
  r = (
    await addAction(owner, {
      id: r.id,
      version: r.version,
      kind: 'corrective',
      category: 'procedure',
      description: 'Revise the filling procedure: weight check and density comparison after a lot change.',
      ownerId: actionOwner.id,
      dueAt: isoDay(Date.now() + 14 * dayMs),
    })
  ).record;
  r = (
    await updatePlan(owner, {
      id: r.id,
      version: r.version,
      title: r.title,
      problemStatement: r.problemStatement,
      rootCause: r.rootCause ?? undefined,
      effectivenessCriteria: 'No split-cap deviations on the test filler over the next 20 batches.',
      ownerId: owner.id,
    })
  ).record;
  r = (await approvePlan(approver, { id: r.id, version: r.version, password: testPassword })).record;
  r = (await startImplementation(owner, { id: r.id, version: r.version })).record;
  const [action] = await db.select().from(capaActions).where(eq(capaActions.capaId, r.id));
  return { owner, approver, actionOwner, otherOperator, supervisor, otherQa, record: r, action: action! };
}

const file = (name = 'procedure rev 8.pdf', bytes: Buffer = pdf) => ({ name, bytes });

describe('evidence of completion as rich text', () => {
  it('saves the text cleaned (script and handlers dropped) and audits the whole saved text (21 CFR 820.100(a)(7), 11.10(e))', async () => {
    const c = await inImplementation();
    const raw =
      '<h2>Done</h2><p onclick="steal()">Procedure <strong>SOP-FIL-007</strong> revised to rev 8.</p><script>fetch("/x")</script>' +
      '<table><tbody><tr><td>Trained</td><td>9 operators</td></tr></tbody></table><img src=x onerror="alert(1)">';
    const clean = '<h2>Done</h2><p>Procedure <strong>SOP-FIL-007</strong> revised to rev 8.</p><table><tbody><tr><td>Trained</td><td>9 operators</td></tr></tbody></table>';
    await completeAction(c.actionOwner, { id: c.record.id, actionId: c.action.id, actionVersion: c.action.version, evidence: raw });

    const [done] = await db.select().from(capaActions).where(eq(capaActions.id, c.action.id));
    expect(done!.evidence).toBe(clean);
    const [entry] = await auditOf(c.record.id, 'complete_action');
    const changes = JSON.parse(entry!.changes) as { field: string; from: unknown; to: unknown }[];
    // 21 CFR 11.10(e): the audit entry carries the value as saved, whole, not a summary.
    expect(changes.find((ch) => ch.field === `action ${c.action.id} · evidence`)).toMatchObject({ from: null, to: clean });
    expect(entry!.userId).toBe(c.actionOwner.id);
  });

  it('refuses empty evidence beside the field and leaves the action open (21 CFR 820.100(a)(7))', async () => {
    const c = await inImplementation();
    for (const evidence of ['', '<p></p>', '<p> </p><script>alert("long enough to count")</script>']) {
      const err = await completeAction(c.actionOwner, { id: c.record.id, actionId: c.action.id, actionVersion: c.action.version, evidence }).catch(
        (e: unknown) => e,
      );
      expect(err).toBeInstanceOf(ValidationError);
      expect((err as ValidationError).fieldErrors.evidence).toEqual([evidenceEmptyMessage]);
    }
    const [still] = await db.select().from(capaActions).where(eq(capaActions.id, c.action.id));
    expect(still).toMatchObject({ completedAt: null, evidence: null, version: c.action.version });
    expect(await auditOf(c.record.id, 'complete_action')).toHaveLength(0);
  });

  it('keeps plain text from a JSON client as it was sent', async () => {
    const c = await inImplementation();
    await completeAction(c.actionOwner, { id: c.record.id, actionId: c.action.id, actionVersion: c.action.version, evidence: 'Procedure revised; rev 8 in use.' });
    const [done] = await db.select().from(capaActions).where(eq(capaActions.id, c.action.id));
    expect(done!.evidence).toBe('Procedure revised; rev 8 in use.');
  });
});

describe('evidence files on a CAPA', () => {
  it('lets the action owner attach while the actions are being done, and audits it (21 CFR 820.100(a)(7), 11.10(e))', async () => {
    const c = await inImplementation();
    expect(await getAttachRefusal('capa', c.record.id, c.actionOwner)).toBeNull();
    const dto = await uploadAttachment(c.actionOwner, { recordType: 'capa', recordId: c.record.id, file: file() });
    expect(dto).toMatchObject({ recordType: 'capa', recordId: c.record.id, fileName: 'procedure rev 8.pdf', contentType: 'application/pdf', uploadedById: c.actionOwner.id });
    const audit = await auditOf(c.record.id, 'attachment_added');
    expect(audit).toHaveLength(1);
    expect(audit[0]!.userId).toBe(c.actionOwner.id);
  });

  it('lets the CAPA owner and other QA attach while it is open (common practice: QA keeps the record complete)', async () => {
    const c = await inImplementation();
    await uploadAttachment(c.owner, { recordType: 'capa', recordId: c.record.id, file: file('work order.png', tinyPng()) });
    await uploadAttachment(c.otherQa, { recordType: 'capa', recordId: c.record.id, file: file() });
    expect(await listAttachments('capa', c.record.id, c.owner)).toHaveLength(2);
  });

  it('refuses an operator or supervisor who owns no action of the CAPA, and an administrator (21 CFR 11.10(d))', async () => {
    const c = await inImplementation();
    for (const who of [c.otherOperator, c.supervisor, await makeUser('admin')]) {
      expect(await getAttachRefusal('capa', c.record.id, who)).toMatch(who.role === 'admin' ? /does not allow this \(attachment: add\)/ : /Only the CAPA owner, QA and, once the plan is approved, the owners of its actions/);
      await expect(uploadAttachment(who, { recordType: 'capa', recordId: c.record.id, file: file() })).rejects.toBeInstanceOf(ForbiddenError);
    }
    expect(await db.select().from(attachments).where(and(eq(attachments.recordType, 'capa'), eq(attachments.recordId, c.record.id)))).toHaveLength(0);
  });

  it('refuses the action owner while the plan is still proposed: there is nothing to do yet (common practice)', async () => {
    const [owner, operator] = await Promise.all([makeUser('qa_investigator'), makeUser('operator')]);
    const created = await createCapa(owner, {
      title: 'Proposed plan, evidence test',
      sourceType: 'trend',
      problemStatement: 'A rising trend of split caps on the test filler.',
      ownerId: owner.id,
    });
    await addAction(owner, {
      id: created.record.id,
      version: created.record.version,
      kind: 'preventive',
      category: 'training',
      description: 'Train the shift on the lot-change check.',
      ownerId: operator.id,
      dueAt: isoDay(Date.now() + 7 * dayMs),
    });
    await expect(uploadAttachment(operator, { recordType: 'capa', recordId: created.record.id, file: file() })).rejects.toBeInstanceOf(ForbiddenError);
    await expect(uploadAttachment(owner, { recordType: 'capa', recordId: created.record.id, file: file() })).resolves.toMatchObject({ recordType: 'capa' });
  });

  it('refuses everybody once the CAPA is closed as effective (EU GMP Annex 11 §9; 21 CFR 211.180: nothing removed)', async () => {
    const c = await inImplementation();
    await uploadAttachment(c.actionOwner, { recordType: 'capa', recordId: c.record.id, file: file() });
    const done = await completeAction(c.actionOwner, {
      id: c.record.id,
      actionId: c.action.id,
      actionVersion: c.action.version,
      evidence: '<p>Procedure rev 8 in use, see the attached file.</p>',
    });
    const check = await openEffectivenessCheck(c.owner, { id: c.record.id, version: done.record.version });
    const closed = await recordEffective(c.approver, { id: c.record.id, version: check.record.version, password: testPassword });
    expect(closed.record.status).toBe('closed_effective');
    for (const who of [c.actionOwner, c.owner, c.approver, c.otherQa]) {
      expect(await getAttachRefusal('capa', c.record.id, who)).toMatch(/can no longer be added once a CAPA is closed or cancelled/);
      // Closed to everyone by its state: 409, whoever asks.
      await expect(uploadAttachment(who, { recordType: 'capa', recordId: c.record.id, file: file() })).rejects.toBeInstanceOf(InvalidTransitionError);
    }
    expect(await listAttachments('capa', c.record.id, c.approver)).toHaveLength(1);
  });

  it('refuses everybody once the CAPA is cancelled (EU GMP Annex 11 §9)', async () => {
    const c = await inImplementation();
    await cancelCapa(c.otherQa, { id: c.record.id, version: c.record.version, reason: 'Raised twice; see the other CAPA.', password: testPassword });
    for (const who of [c.actionOwner, c.owner]) {
      await expect(uploadAttachment(who, { recordType: 'capa', recordId: c.record.id, file: file() })).rejects.toBeInstanceOf(InvalidTransitionError);
    }
  });

  it('lets every CAPA reader list and download the files, and tells nobody about a CAPA that does not exist (21 CFR 11.10(d))', async () => {
    const c = await inImplementation();
    const dto = await uploadAttachment(c.actionOwner, { recordType: 'capa', recordId: c.record.id, file: file() });
    // capa.read: every role, an operator who owns no action included.
    for (const reader of [c.supervisor, c.otherOperator, await makeUser('admin')]) {
      const list = await listAttachments('capa', c.record.id, reader);
      expect(list.map((a) => [a.id, a.sha256])).toEqual([[dto.id, dto.sha256]]);
    }
    const link = await getDownloadLink(dto.id, c.supervisor);
    expect(link.fileName).toBe('procedure rev 8.pdf');
    await expect(listAttachments('capa', 2_000_000_000, c.supervisor)).rejects.toBeInstanceOf(NotFoundError);
  });
});
