import type { ReactNode } from 'react';
import { StatusIcon, type Tone } from './status-badge';

/*
 * A message box. Errors use role="alert" so they are announced when they appear; other tones use
 * role="status". The icon and the heading word carry the meaning, not the colour alone.
 */

const toneClasses: Record<Tone, string> = {
  ok: 'border-ok-700 bg-ok-100 text-ok-700',
  warn: 'border-warn-700 bg-warn-100 text-warn-700',
  danger: 'border-danger-700 bg-danger-100 text-danger-700',
  info: 'border-info-700 bg-info-100 text-info-700',
  neutral: 'border-ink-400 bg-ink-100 text-ink-800',
};

export function Notice({
  tone = 'info',
  title,
  children,
  live = true,
}: {
  tone?: Tone;
  title?: string;
  children?: ReactNode;
  /** false for static guidance that is part of the page, not a reaction to the user. */
  live?: boolean;
}) {
  const role = live ? (tone === 'danger' ? 'alert' : 'status') : undefined;
  return (
    <div role={role} className={`flex gap-3 rounded-md border-l-4 px-4 py-3 ${toneClasses[tone]}`}>
      <StatusIcon tone={tone} className="mt-0.5 h-5 w-5 shrink-0" />
      <div className="flex flex-col gap-1 text-ink-900">
        {title ? <p className="font-semibold">{title}</p> : null}
        {children ? <div className="text-ink-800">{children}</div> : null}
      </div>
    </div>
  );
}
