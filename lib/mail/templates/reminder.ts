import type { IsoDate } from '../../clocks/dates';
import { type ReminderKind, describeDue } from '../../reminders/rules';
import { type RenderedMail, renderMailLayout } from './layout';

/* The due-soon and overdue reminder: pure, so its wording and both parts are unit-tested. */

export interface ReminderMailInput {
  siteName: string;
  kind: ReminderKind;
  daysLeft: number;
  /** e.g. "deviation", "CAPA action". */
  noun: string;
  recordNumber: string;
  title: string;
  dueOn: IsoDate;
  /** Why this person gets it, e.g. "You own this deviation." */
  role: string;
  url: string;
}

export function renderReminderMail(input: ReminderMailInput): RenderedMail & { subject: string } {
  const due = describeDue(input.daysLeft);
  const subject =
    input.kind === 'overdue'
      ? `Overdue: ${input.noun} ${input.recordNumber} (${due})`
      : `Reminder: ${input.noun} ${input.recordNumber} is ${due}`;
  const rendered = renderMailLayout({
    siteName: input.siteName,
    recordNumber: input.recordNumber,
    heading: input.kind === 'overdue' ? `${input.recordNumber} is ${due}` : `${input.recordNumber} is ${due}`,
    paragraphs: [
      `${input.title}`,
      input.kind === 'overdue'
        ? `It was due on ${input.dueOn}. If it cannot be finished, record why and agree a new date with QA as your site's procedure requires.`
        : `It is due on ${input.dueOn}.`,
    ],
    link: { url: input.url, label: `Open the ${input.noun}` },
    footer: `${input.role} Overdue reminders come once a day until it is done.`,
  });
  return { ...rendered, subject };
}
