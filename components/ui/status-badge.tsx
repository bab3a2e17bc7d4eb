/*
 * Status shown as icon + word on a tinted chip. The shapes differ per tone (check, pause bars,
 * cross, "i", dot) so the status reads without colour (WCAG 2.2 1.4.1).
 */

export type Tone = 'ok' | 'warn' | 'danger' | 'info' | 'neutral';

const chipClasses: Record<Tone, string> = {
  ok: 'bg-ok-100 text-ok-700 border-ok-700/40',
  warn: 'bg-warn-100 text-warn-700 border-warn-700/40',
  danger: 'bg-danger-100 text-danger-700 border-danger-700/40',
  info: 'bg-info-100 text-info-700 border-info-700/40',
  neutral: 'bg-ink-100 text-ink-700 border-ink-400/60',
};

export function StatusIcon({ tone, className = 'h-4 w-4' }: { tone: Tone; className?: string }) {
  const common = {
    viewBox: '0 0 16 16',
    className,
    'aria-hidden': true,
    focusable: false,
    fill: 'none',
    stroke: 'currentColor',
    strokeWidth: 1.8,
    strokeLinecap: 'round' as const,
    strokeLinejoin: 'round' as const,
  };
  switch (tone) {
    case 'ok':
      return (
        <svg {...common}>
          <circle cx="8" cy="8" r="6.5" />
          <path d="M5 8.2l2 2 4-4.2" />
        </svg>
      );
    case 'warn':
      return (
        <svg {...common}>
          <path d="M8 1.8l6.4 11.4H1.6z" />
          <path d="M8 6.2v3.2M8 11.4v.1" />
        </svg>
      );
    case 'danger':
      return (
        <svg {...common}>
          <path d="M5.2 1.5h5.6l3.7 3.7v5.6l-3.7 3.7H5.2l-3.7-3.7V5.2z" />
          <path d="M5.8 5.8l4.4 4.4M10.2 5.8l-4.4 4.4" />
        </svg>
      );
    case 'info':
      return (
        <svg {...common}>
          <circle cx="8" cy="8" r="6.5" />
          <path d="M8 7.2v4M8 4.8v.1" />
        </svg>
      );
    case 'neutral':
      return (
        <svg {...common}>
          <circle cx="8" cy="8" r="3" fill="currentColor" />
        </svg>
      );
  }
}

export function StatusBadge({ tone, label }: { tone: Tone; label: string }) {
  return (
    <span
      className={`inline-flex items-center gap-1.5 rounded-full border px-2.5 py-0.5 text-sm font-semibold whitespace-nowrap ${chipClasses[tone]}`}
    >
      <StatusIcon tone={tone} />
      {label}
    </span>
  );
}
