'use client';

import { TableKit } from '@tiptap/extension-table';
import { EditorContent, type Editor, useEditor, useEditorState } from '@tiptap/react';
import StarterKit from '@tiptap/starter-kit';
import { type KeyboardEvent, type ReactNode, useId, useRef, useState } from 'react';
import { proseClasses } from './prose';

/*
 * A rich-text field for reports: headings, bold, italic, lists, links and tables, with undo. It
 * posts with an ordinary form through a hidden input holding the HTML; the server cleans that HTML
 * before it is saved (lib/rich-text/sanitize.ts), so nothing here is trusted. The toolbar is a row
 * of real buttons (Tab reaches each one, 44 px targets) that say which formats are on with
 * aria-pressed. Links are typed into a small field in the toolbar, not a browser prompt.
 */

export interface RichTextEditorProps {
  /** Name of the hidden input the HTML posts under. */
  name: string;
  /** Id of the element that labels the field (the field's visible label). */
  labelledBy: string;
  /** Ids of the hint and error texts, if any. */
  describedBy?: string | undefined;
  initialHtml: string;
  invalid?: boolean;
  /** Told on every change, so the form can keep the text through a failed save. */
  onChange?: (html: string) => void;
}

const linkSchemes = /^(?:https?:\/\/|mailto:)/i;

function ToolButton({
  label,
  pressed,
  disabled,
  onClick,
  children,
}: {
  label: string;
  pressed?: boolean;
  disabled?: boolean;
  onClick: () => void;
  children: ReactNode;
}) {
  return (
    <button
      type="button"
      aria-label={label}
      title={label}
      aria-pressed={pressed}
      disabled={disabled}
      onClick={onClick}
      // The editor keeps its selection when a toolbar button is pressed with the mouse.
      onMouseDown={(e) => e.preventDefault()}
      className={[
        'inline-flex min-h-11 min-w-11 items-center justify-center rounded-md border px-2 text-sm font-semibold',
        'disabled:cursor-not-allowed disabled:opacity-50',
        pressed ? 'border-ink-900 bg-ink-900 text-white' : 'border-ink-300 bg-white text-ink-900 hover:bg-ink-100',
      ].join(' ')}
    >
      {children}
    </button>
  );
}

function Separator() {
  return <span aria-hidden="true" className="mx-1 h-8 w-px self-center bg-ink-200" />;
}

export function RichTextEditor({ name, labelledBy, describedBy, initialHtml, invalid, onChange }: RichTextEditorProps) {
  const [html, setHtml] = useState(initialHtml);
  const [linkOpen, setLinkOpen] = useState(false);
  const [linkUrl, setLinkUrl] = useState('');
  const [linkError, setLinkError] = useState<string | null>(null);
  const linkInput = useRef<HTMLInputElement>(null);
  const uid = useId();

  const editor = useEditor({
    immediatelyRender: false,
    extensions: [
      StarterKit.configure({
        heading: { levels: [2, 3, 4] },
        link: {
          openOnClick: false,
          autolink: true,
          defaultProtocol: 'https',
          protocols: ['http', 'https', 'mailto'],
          HTMLAttributes: { rel: 'noopener noreferrer', target: '_blank' },
        },
      }),
      TableKit.configure({ table: { resizable: false } }),
    ],
    content: initialHtml,
    editorProps: {
      attributes: {
        role: 'textbox',
        'aria-multiline': 'true',
        'aria-labelledby': labelledBy,
        ...(describedBy ? { 'aria-describedby': describedBy } : {}),
        ...(invalid ? { 'aria-invalid': 'true' } : {}),
        class: `${proseClasses} min-h-48 px-3 py-2 focus:outline-none [&_table]:table-fixed [&_td]:min-w-16 [&_th]:min-w-16 [&_.selectedCell]:bg-brass-100`,
      },
    },
    onUpdate: ({ editor: e }) => {
      const next = e.isEmpty ? '' : e.getHTML();
      setHtml(next);
      onChange?.(next);
    },
  });

  const active = useEditorState({
    editor,
    selector: ({ editor: e }: { editor: Editor | null }) => ({
      h2: e?.isActive('heading', { level: 2 }) ?? false,
      h3: e?.isActive('heading', { level: 3 }) ?? false,
      bold: e?.isActive('bold') ?? false,
      italic: e?.isActive('italic') ?? false,
      bullet: e?.isActive('bulletList') ?? false,
      ordered: e?.isActive('orderedList') ?? false,
      link: e?.isActive('link') ?? false,
      inTable: e?.isActive('table') ?? false,
      canUndo: e?.can().undo() ?? false,
      canRedo: e?.can().redo() ?? false,
    }),
  });

  const run = (fn: (e: Editor) => void) => () => {
    if (editor) fn(editor);
  };

  const openLink = () => {
    if (!editor) return;
    setLinkUrl((editor.getAttributes('link').href as string | undefined) ?? '');
    setLinkError(null);
    setLinkOpen(true);
    requestAnimationFrame(() => linkInput.current?.focus());
  };

  const applyLink = () => {
    if (!editor) return;
    const url = linkUrl.trim();
    if (url === '') {
      editor.chain().focus().extendMarkRange('link').unsetLink().run();
      setLinkOpen(false);
      return;
    }
    const href = linkSchemes.test(url) ? url : /^[^\s:/]+\.[^\s]+$/.test(url) ? `https://${url}` : null;
    if (!href) {
      setLinkError('Use an address starting with https://, http:// or mailto:.');
      return;
    }
    const chain = editor.chain().focus().extendMarkRange('link');
    if (editor.state.selection.empty && !editor.isActive('link')) {
      chain.insertContent({ type: 'text', text: url, marks: [{ type: 'link', attrs: { href } }] }).run();
    } else {
      chain.setLink({ href }).run();
    }
    setLinkOpen(false);
  };

  const onLinkKey = (e: KeyboardEvent<HTMLInputElement>) => {
    // Enter here applies the link; it must not submit the whole form.
    if (e.key === 'Enter') {
      e.preventDefault();
      applyLink();
    } else if (e.key === 'Escape') {
      e.preventDefault();
      setLinkOpen(false);
      editor?.commands.focus();
    }
  };

  const s = active ?? { h2: false, h3: false, bold: false, italic: false, bullet: false, ordered: false, link: false, inTable: false, canUndo: false, canRedo: false };

  return (
    <div
      className={`rounded-md border bg-white focus-within:outline-2 focus-within:outline-offset-2 focus-within:outline-focus ${
        invalid ? 'border-2 border-danger-700' : 'border-ink-400'
      }`}
    >
      <input type="hidden" name={name} value={html} />
      <div role="toolbar" aria-label="Formatting" aria-controls={`${uid}-content`} className="flex flex-wrap gap-1 border-b border-ink-200 bg-ink-50 p-1">
        <ToolButton label="Heading" pressed={s.h2} onClick={run((e) => e.chain().focus().toggleHeading({ level: 2 }).run())}>
          H2
        </ToolButton>
        <ToolButton label="Subheading" pressed={s.h3} onClick={run((e) => e.chain().focus().toggleHeading({ level: 3 }).run())}>
          H3
        </ToolButton>
        <Separator />
        <ToolButton label="Bold" pressed={s.bold} onClick={run((e) => e.chain().focus().toggleBold().run())}>
          <span className="font-bold">B</span>
        </ToolButton>
        <ToolButton label="Italic" pressed={s.italic} onClick={run((e) => e.chain().focus().toggleItalic().run())}>
          <span className="italic">I</span>
        </ToolButton>
        <Separator />
        <ToolButton label="Bulleted list" pressed={s.bullet} onClick={run((e) => e.chain().focus().toggleBulletList().run())}>
          <span aria-hidden="true">• —</span>
        </ToolButton>
        <ToolButton label="Numbered list" pressed={s.ordered} onClick={run((e) => e.chain().focus().toggleOrderedList().run())}>
          <span aria-hidden="true">1. —</span>
        </ToolButton>
        <ToolButton label={s.link ? 'Edit link' : 'Add link'} pressed={s.link || linkOpen} onClick={openLink}>
          Link
        </ToolButton>
        <Separator />
        <ToolButton label="Insert table" onClick={run((e) => e.chain().focus().insertTable({ rows: 3, cols: 3, withHeaderRow: true }).run())}>
          Table
        </ToolButton>
        <ToolButton label="Add row below" disabled={!s.inTable} onClick={run((e) => e.chain().focus().addRowAfter().run())}>
          + Row
        </ToolButton>
        <ToolButton label="Add column to the right" disabled={!s.inTable} onClick={run((e) => e.chain().focus().addColumnAfter().run())}>
          + Col
        </ToolButton>
        <ToolButton label="Delete row" disabled={!s.inTable} onClick={run((e) => e.chain().focus().deleteRow().run())}>
          − Row
        </ToolButton>
        <Separator />
        <ToolButton label="Undo" disabled={!s.canUndo} onClick={run((e) => e.chain().focus().undo().run())}>
          <span aria-hidden="true">↶</span>
        </ToolButton>
        <ToolButton label="Redo" disabled={!s.canRedo} onClick={run((e) => e.chain().focus().redo().run())}>
          <span aria-hidden="true">↷</span>
        </ToolButton>
      </div>
      {linkOpen ? (
        <div className="flex flex-wrap items-end gap-2 border-b border-ink-200 bg-ink-50 p-2">
          <div className="flex min-w-0 flex-1 flex-col gap-1">
            <label htmlFor={`${uid}-link`} className="text-sm font-semibold">
              Link address
            </label>
            <input
              ref={linkInput}
              id={`${uid}-link`}
              type="url"
              inputMode="url"
              value={linkUrl}
              onChange={(e) => setLinkUrl(e.target.value)}
              onKeyDown={onLinkKey}
              placeholder="https://…"
              aria-invalid={linkError ? true : undefined}
              aria-describedby={linkError ? `${uid}-link-error` : undefined}
              className="min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2"
            />
            {linkError ? (
              <p id={`${uid}-link-error`} className="text-sm font-semibold text-danger-700">
                {linkError}
              </p>
            ) : null}
          </div>
          <button type="button" onClick={applyLink} className="min-h-11 rounded-md border border-ink-900 bg-ink-900 px-3 font-semibold text-white">
            {linkUrl.trim() === '' ? 'Remove link' : 'Apply link'}
          </button>
          <button
            type="button"
            onClick={() => {
              setLinkOpen(false);
              editor?.commands.focus();
            }}
            className="min-h-11 rounded-md border border-ink-400 bg-white px-3 font-semibold"
          >
            Cancel
          </button>
        </div>
      ) : null}
      <div id={`${uid}-content`} className="max-h-[36rem] overflow-y-auto">
        <EditorContent editor={editor} />
      </div>
    </div>
  );
}
