'use client';

import { useId, useState } from 'react';
import {
  type ClockState,
  dietarySupplementSaeDeadline,
  fieldAlertReportDeadline,
  firstSupportedYear,
  formatLongDate,
  isIsoDate,
  lastSupportedYear,
  yearOf,
} from '@/lib/clocks';

/*
 * Regulatory reporting deadlines for a day of receipt, computed in the browser on every change
 * (pure lib/clocks). Day 0 is the day the information was first received.
 */

const stateText: Record<ClockState, string> = { open: 'Open', due_today: 'Due today', overdue: 'Overdue' };

const remaining = (n: number) =>
  n > 0 ? `${n} business day${n === 1 ? '' : 's'} left` : n === 0 ? 'due today' : `${-n} business day${n === -1 ? '' : 's'} late`;

export function DeadlineCalculator({ today }: { today: string }) {
  const [receivedOn, setReceivedOn] = useState(today);
  const inputId = useId();
  const valid = isIsoDate(receivedOn) && yearOf(receivedOn) >= firstSupportedYear && yearOf(receivedOn) < lastSupportedYear;
  const deadlines = valid ? [fieldAlertReportDeadline(receivedOn, today), dietarySupplementSaeDeadline(receivedOn, today)] : [];
  return (
    <div className="flex flex-col gap-4">
      <div className="flex max-w-xs flex-col gap-1">
        <label htmlFor={inputId} className="font-semibold text-ink-900">
          Information first received on
        </label>
        <input
          id={inputId}
          type="date"
          value={receivedOn}
          onChange={(e) => setReceivedOn(e.target.value)}
          aria-describedby={`${inputId}-hint`}
          className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base"
        />
        <p id={`${inputId}-hint`} className="text-sm text-ink-600">
          Day 0; counting starts the next business day. Today at the site is {formatLongDate(today)}.
        </p>
      </div>
      {valid ? (
        <ul className="grid grid-cols-1 gap-3 lg:grid-cols-2" aria-live="polite">
          {deadlines.map((d) => (
            <li key={d.kind} className="rounded-lg border border-ink-200 bg-white p-4">
              <p className="font-semibold text-ink-900">{d.title}</p>
              <p className="text-lg">
                Due {formatLongDate(d.deadline)}{' '}
                <span className="text-base text-ink-700">
                  · {stateText[d.state]}, {remaining(d.businessDaysRemaining)}
                </span>
              </p>
              <p className="mt-1 text-sm text-ink-700">
                {d.businessDays} business days ({d.citation}). {d.rule}
              </p>
            </li>
          ))}
        </ul>
      ) : (
        <p role="status" className="text-ink-700">
          Enter a date between {firstSupportedYear} and {lastSupportedYear - 1}.
        </p>
      )}
    </div>
  );
}
