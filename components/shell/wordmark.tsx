/*
 * The Plumbline mark: a plumb bob hanging true on its line, the mason's reference for "vertical".
 * The line takes the text colour so the mark works on light and dark surfaces; the bob is brass.
 */

export function PlumbMark({ className = 'h-9 w-7' }: { className?: string }) {
  return (
    <svg viewBox="0 0 24 32" className={className} aria-hidden="true" focusable="false">
      <path d="M12 1v8.5" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
      <rect x="8.75" y="9.25" width="6.5" height="2.5" rx="0.75" className="fill-brass-300" />
      <path d="M7 12.75h10v2c0 4-2.4 8-5 12.75-2.6-4.75-5-8.75-5-12.75z" className="fill-brass-400" />
    </svg>
  );
}

export function Wordmark({ tone = 'dark' }: { tone?: 'dark' | 'light' }) {
  return (
    <span className={`inline-flex items-center gap-2 ${tone === 'light' ? 'text-white' : 'text-ink-900'}`}>
      <PlumbMark />
      <span className="text-xl font-bold tracking-tight">Plumbline</span>
    </span>
  );
}
