import { sanitizeRichText } from '@/lib/rich-text/sanitize';
import { proseClasses } from './prose';

/*
 * Shows stored rich text. It was cleaned on the server when saved; it is cleaned again here, so a
 * row written around the application (or before a rule was tightened) still cannot run script.
 * Wide tables scroll inside their own region rather than widening the page on a tablet.
 */
export function RichTextView({ html, label, className = '' }: { html: string; label?: string; className?: string }) {
  return (
    <div
      className={`${proseClasses} [&_table]:block [&_table]:overflow-x-auto ${className}`}
      aria-label={label}
      role={label ? 'region' : undefined}
      dangerouslySetInnerHTML={{ __html: sanitizeRichText(html) }}
    />
  );
}
