/*
 * Reading typography for rich text, shared by the editor and the read-only view so a report looks
 * the same while it is written and when it is read. Plain Tailwind utilities on descendants (no
 * typography plugin in this project).
 */
export const proseClasses = [
  'text-base leading-relaxed text-ink-900 break-words',
  '[&_p]:my-2 [&_p:first-child]:mt-0',
  '[&_h2]:mt-5 [&_h2]:mb-2 [&_h2]:text-xl [&_h2]:font-semibold [&_h2:first-child]:mt-0',
  '[&_h3]:mt-4 [&_h3]:mb-2 [&_h3]:text-lg [&_h3]:font-semibold [&_h3:first-child]:mt-0',
  '[&_h4]:mt-3 [&_h4]:mb-1 [&_h4]:font-semibold [&_h4:first-child]:mt-0',
  '[&_ul]:my-2 [&_ul]:list-disc [&_ul]:pl-6 [&_ol]:my-2 [&_ol]:list-decimal [&_ol]:pl-6 [&_li]:my-1 [&_li>p]:my-0',
  '[&_a]:text-info-700 [&_a]:underline [&_a]:underline-offset-4',
  '[&_blockquote]:my-3 [&_blockquote]:border-l-4 [&_blockquote]:border-ink-300 [&_blockquote]:pl-4 [&_blockquote]:text-ink-700',
  '[&_code]:rounded [&_code]:bg-ink-100 [&_code]:px-1 [&_code]:font-mono [&_code]:text-[0.9em]',
  '[&_pre]:my-3 [&_pre]:overflow-x-auto [&_pre]:rounded-md [&_pre]:bg-ink-100 [&_pre]:p-3 [&_pre_code]:bg-transparent [&_pre_code]:p-0',
  '[&_hr]:my-4 [&_hr]:border-ink-200',
  '[&_table]:my-3 [&_table]:w-full [&_table]:border-collapse [&_table]:text-left',
  '[&_th]:border [&_th]:border-ink-300 [&_th]:bg-ink-50 [&_th]:px-2 [&_th]:py-1 [&_th]:font-semibold [&_th]:align-top',
  '[&_td]:border [&_td]:border-ink-300 [&_td]:px-2 [&_td]:py-1 [&_td]:align-top [&_td>p]:my-0 [&_th>p]:my-0 [&_td>p]:min-h-[1.5em] [&_th>p]:min-h-[1.5em]',
].join(' ');
