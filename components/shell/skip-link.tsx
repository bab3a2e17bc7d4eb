/** First stop for keyboard users: jumps past the header and navigation (WCAG 2.2 2.4.1). */
export function SkipLink({ target = 'main' }: { target?: string }) {
  return (
    <a
      href={`#${target}`}
      className="sr-only z-50 rounded-md bg-brass-300 font-semibold text-ink-950 focus:not-sr-only focus:fixed focus:top-2 focus:left-2 focus:px-4 focus:py-3"
    >
      Skip to main content
    </a>
  );
}
