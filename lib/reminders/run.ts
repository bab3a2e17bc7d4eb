import { and, asc, eq, gt, inArray, isNull, lte, or } from 'drizzle-orm';
import { db as defaultDb, type DbOrTx } from '../../db/client';
import { capaActions, capas, deviations, users } from '../../db/schema';
import { addDays, isoDateOfInstant, todayIn } from '../clocks/dates';
import { complaintReportSource } from '../complaints/report-reminders';
import { openDeviationStates } from '../deviations/kind';
import { getEnv } from '../env';
import { enqueueMail } from '../mail/outbox';
import { renderReminderMail } from '../mail/templates/reminder';
import type { RecordType } from '../records/types';
import { getSiteTimeZone } from '../site-calendar/queries';
import { dueSoonDays, reminderFor } from './rules';

/*
 * The reminder sweep the worker runs: every open item whose due date is within three site days or
 * past gets its reminder queued in the outbox. Safe to run as often as you like and from several
 * workers at once: each message has a de-duplication key (lib/reminders/rules.ts) and the outbox
 * keeps the first. Items are read a page at a time on the (status, due) index, so a large backlog
 * never loads at once.
 */

export interface ReminderItem {
  recordType: RecordType;
  recordId: number;
  /** The row the source pages by (with dueAt): the deviation's id, a CAPA action's id. */
  cursorId: number;
  /** Distinguishes items within a record (a CAPA's actions); the record itself when absent. */
  itemKey: string;
  noun: string;
  number: string;
  title: string;
  /** Stored as midnight UTC of the due date (lib/clocks/due-dates). */
  dueAt: Date;
  recipient: { id: number; email: string };
  role: string;
  path: string;
}

/** One page of items due on or before `horizon`, after the cursor; sources are added per record type. */
export type ReminderSource = (database: DbOrTx, horizon: Date, after: { dueAt: Date; id: number } | null, limit: number) => Promise<ReminderItem[]>;

const deviationSource: ReminderSource = async (database, horizon, after, limit) => {
  const rows = await database
    .select({
      id: deviations.id,
      number: deviations.number,
      title: deviations.title,
      dueAt: deviations.dueAt,
      ownerId: users.id,
      ownerEmail: users.email,
    })
    .from(deviations)
    .innerJoin(users, and(eq(users.id, deviations.ownerId), eq(users.active, true)))
    .where(
      and(
        inArray(deviations.status, [...openDeviationStates]),
        lte(deviations.dueAt, horizon),
        after ? or(gt(deviations.dueAt, after.dueAt), and(eq(deviations.dueAt, after.dueAt), gt(deviations.id, after.id))) : undefined,
      ),
    )
    .orderBy(asc(deviations.dueAt), asc(deviations.id))
    .limit(limit);
  return rows
    .filter((r): r is typeof r & { dueAt: Date; number: string } => r.dueAt !== null && r.number !== null)
    .map((r) => ({
      recordType: 'deviation',
      recordId: r.id,
      cursorId: r.id,
      itemKey: `deviation:${r.id}`,
      noun: 'deviation',
      number: r.number,
      title: r.title,
      dueAt: r.dueAt,
      recipient: { id: r.ownerId, email: r.ownerEmail },
      role: 'You receive this because you own this deviation.',
      path: `/deviations/${r.id}`,
    }));
};

/** CAPAs still being planned or carried out, to their owner. */
const openCapaStates = ['proposed', 'plan_approved', 'implementation'] as const;

const capaSource: ReminderSource = async (database, horizon, after, limit) => {
  const rows = await database
    .select({ id: capas.id, number: capas.number, title: capas.title, dueAt: capas.dueAt, ownerId: users.id, ownerEmail: users.email })
    .from(capas)
    .innerJoin(users, and(eq(users.id, capas.ownerId), eq(users.active, true)))
    .where(
      and(
        inArray(capas.status, [...openCapaStates]),
        lte(capas.dueAt, horizon),
        after ? or(gt(capas.dueAt, after.dueAt), and(eq(capas.dueAt, after.dueAt), gt(capas.id, after.id))) : undefined,
      ),
    )
    .orderBy(asc(capas.dueAt), asc(capas.id))
    .limit(limit);
  return rows
    .filter((r): r is typeof r & { dueAt: Date } => r.dueAt !== null)
    .map((r) => ({
      recordType: 'capa',
      recordId: r.id,
      cursorId: r.id,
      itemKey: `capa:${r.id}`,
      noun: 'CAPA',
      number: r.number,
      title: r.title,
      dueAt: r.dueAt,
      recipient: { id: r.ownerId, email: r.ownerEmail },
      role: 'You receive this because you own this CAPA.',
      path: `/capa/${r.id}`,
    }));
};

/** Open actions of the current plan round of CAPAs being carried out, to the action's owner. */
const capaActionSource: ReminderSource = async (database, horizon, after, limit) => {
  const rows = await database
    .select({
      id: capaActions.id,
      capaId: capas.id,
      number: capas.number,
      description: capaActions.description,
      dueAt: capaActions.dueAt,
      ownerId: users.id,
      ownerEmail: users.email,
    })
    .from(capaActions)
    .innerJoin(capas, and(eq(capas.id, capaActions.capaId), eq(capas.planRound, capaActions.round)))
    .innerJoin(users, and(eq(users.id, capaActions.ownerId), eq(users.active, true)))
    .where(
      and(
        isNull(capaActions.completedAt),
        lte(capaActions.dueAt, horizon),
        inArray(capas.status, ['plan_approved', 'implementation']),
        after ? or(gt(capaActions.dueAt, after.dueAt), and(eq(capaActions.dueAt, after.dueAt), gt(capaActions.id, after.id))) : undefined,
      ),
    )
    .orderBy(asc(capaActions.dueAt), asc(capaActions.id))
    .limit(limit);
  return rows.map((r) => ({
    recordType: 'capa',
    recordId: r.capaId,
    cursorId: r.id,
    itemKey: `capa_action:${r.id}`,
    noun: 'CAPA action',
    number: r.number,
    title: r.description.length > 200 ? `${r.description.slice(0, 197)}…` : r.description,
    dueAt: r.dueAt,
    recipient: { id: r.ownerId, email: r.ownerEmail },
    role: 'You receive this because this action of the CAPA is yours.',
    path: `/capa/${r.capaId}`,
  }));
};

export const reminderSources: Record<string, ReminderSource> = {
  deviation: deviationSource,
  capa: capaSource,
  capaAction: capaActionSource,
  complaintReport: complaintReportSource,
};

export interface ReminderRunResult {
  examined: number;
  queued: number;
}

export async function runRemindersOnce(opts: { now?: Date; database?: DbOrTx; pageSize?: number } = {}): Promise<ReminderRunResult> {
  const database = opts.database ?? defaultDb;
  const now = opts.now ?? new Date();
  const pageSize = opts.pageSize ?? 200;
  const env = getEnv();
  const today = todayIn(await getSiteTimeZone(database), now);
  // Due dates are stored as midnight UTC of the date, so the horizon is the last due-soon date itself.
  const horizon = new Date(`${addDays(today, dueSoonDays)}T00:00:00.000Z`);
  const result: ReminderRunResult = { examined: 0, queued: 0 };

  for (const source of Object.values(reminderSources)) {
    let cursor: { dueAt: Date; id: number } | null = null;
    for (;;) {
      const items = await source(database, horizon, cursor, pageSize);
      if (items.length === 0) break;
      for (const item of items) {
        result.examined++;
        const dueOn = isoDateOfInstant(item.dueAt);
        const decision = reminderFor({ itemKey: item.itemKey, dueOn, today, recipientId: item.recipient.id });
        if (!decision) continue;
        const mail = renderReminderMail({
          siteName: env.SITE_NAME,
          kind: decision.kind,
          daysLeft: decision.daysLeft,
          noun: item.noun,
          recordNumber: item.number,
          title: item.title,
          dueOn,
          role: item.role,
          url: new URL(item.path, env.APP_URL).toString(),
        });
        const { queued } = await enqueueMail(database, {
          dedupeKey: decision.dedupeKey,
          template: decision.kind === 'overdue' ? 'reminder_overdue' : 'reminder_due_soon',
          to: { address: item.recipient.email, userId: item.recipient.id },
          subject: mail.subject,
          text: mail.text,
          html: mail.html,
          recordType: item.recordType,
          recordId: item.recordId,
        });
        if (queued) result.queued++;
      }
      if (items.length < pageSize) break;
      const last = items[items.length - 1]!;
      cursor = { dueAt: last.dueAt, id: last.cursorId };
    }
  }
  return result;
}
