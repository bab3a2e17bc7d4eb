import { describe, expect, it } from 'vitest';
import { todayIn } from '../../../lib/clocks/dates';
import { renderReminderMail } from '../../../lib/mail/templates/reminder';
import { describeDue, reminderFor } from '../../../lib/reminders/rules';

/*
 * Reminder timing. The three-day warning and the once-a-day overdue notice are the product's
 * requirement (issue 5); there is no published standard for them, so these are common practice.
 */

const item = { itemKey: 'deviation:42', recipientId: 7 };

describe('reminderFor', () => {
  it('says nothing more than three days ahead', () => {
    expect(reminderFor({ ...item, dueOn: '2026-12-10', today: '2026-12-06' })).toBeNull();
  });

  it('warns from three days before to the day itself, with one key per due date', () => {
    const keys = ['2026-12-07', '2026-12-08', '2026-12-09', '2026-12-10'].map((today) => {
      const r = reminderFor({ ...item, dueOn: '2026-12-10', today });
      expect(r?.kind).toBe('due_soon');
      return r!.dedupeKey;
    });
    expect(new Set(keys).size).toBe(1);
    expect(keys[0]).toBe('due-soon:deviation:42:2026-12-10:7');
  });

  it('re-arms the warning when the due date moves', () => {
    const a = reminderFor({ ...item, dueOn: '2026-12-10', today: '2026-12-08' });
    const b = reminderFor({ ...item, dueOn: '2026-12-11', today: '2026-12-08' });
    expect(a!.dedupeKey).not.toBe(b!.dedupeKey);
  });

  it('sends overdue notices once per site day, from the day after the due date', () => {
    const d1 = reminderFor({ ...item, dueOn: '2026-12-10', today: '2026-12-11' });
    const d2 = reminderFor({ ...item, dueOn: '2026-12-10', today: '2026-12-12' });
    expect(d1).toEqual({ kind: 'overdue', daysLeft: -1, dedupeKey: 'overdue:deviation:42:2026-12-11:7' });
    expect(d2!.dedupeKey).toBe('overdue:deviation:42:2026-12-12:7');
  });

  it('counts site days across a year end', () => {
    expect(reminderFor({ ...item, dueOn: '2027-01-01', today: '2026-12-29' })?.daysLeft).toBe(3);
    expect(reminderFor({ ...item, dueOn: '2026-12-31', today: '2027-01-02' })?.daysLeft).toBe(-2);
  });

  it("uses the site's calendar day, not UTC's: 03:00 UTC on 11 December is still 10 December in Chicago", () => {
    // IANA tz database: America/Chicago is UTC-6 in December (CST).
    const today = todayIn('America/Chicago', new Date('2026-12-11T03:00:00Z'));
    expect(today).toBe('2026-12-10');
    expect(reminderFor({ ...item, dueOn: '2026-12-10', today })?.kind).toBe('due_soon');
  });
});

describe('reminder wording', () => {
  it('reads naturally for each distance', () => {
    expect([3, 1, 0, -1, -12].map(describeDue)).toEqual(['due in 3 days', 'due tomorrow', 'due today', '1 day overdue', '12 days overdue']);
  });

  it('has the site, the number, the due date and a link in both parts', () => {
    const mail = renderReminderMail({
      siteName: 'Brackwater Capsule Co.',
      kind: 'overdue',
      daysLeft: -2,
      noun: 'deviation',
      recordNumber: 'DEV-2026-0042',
      title: 'Broken bodies on filler 2 <ring 3>',
      dueOn: '2026-12-10',
      role: 'You receive this because you own this deviation.',
      url: 'http://localhost:3000/deviations/42',
    });
    expect(mail.subject).toBe('Overdue: deviation DEV-2026-0042 (2 days overdue)');
    for (const part of [mail.text, mail.html]) {
      expect(part).toContain('Brackwater Capsule Co.');
      expect(part).toContain('DEV-2026-0042');
      expect(part).toContain('2026-12-10');
      expect(part).toContain('http://localhost:3000/deviations/42');
    }
    expect(mail.html).toContain('&lt;ring 3&gt;');
    expect(mail.html).not.toContain('<ring 3>');
  });
});
