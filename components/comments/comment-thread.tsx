import { formatUtc } from '@/components/ui/format';
import type { CommentDto } from '@/lib/comments/queries';

/* A record's comments, oldest first, as plain text; @mentions stand out so a reader sees who was asked. */

function withMentions(body: string) {
  return body.split(/((?:^|(?<=[^A-Za-z0-9._%+\-@]))@[A-Za-z0-9._%+-]+(?:@[A-Za-z0-9-]+(?:\.[A-Za-z0-9-]+)+)?)/g).map((part, i) =>
    part.startsWith('@') ? (
      <strong key={i} className="font-semibold text-info-700">
        {part}
      </strong>
    ) : (
      part
    ),
  );
}

export function CommentThread({ comments }: { comments: CommentDto[] }) {
  if (comments.length === 0) return <p className="text-ink-600">No comments yet.</p>;
  return (
    <ol className="flex flex-col gap-3" aria-label="Comments, oldest first">
      {comments.map((c) => (
        <li key={c.id} id={`comment-${c.id}`} className="rounded-md border border-ink-200 bg-white px-4 py-3">
          <p className="text-sm text-ink-600">
            <span className="font-semibold text-ink-900">{c.userName}</span> · <time dateTime={c.at}>{formatUtc(c.at)}</time>
          </p>
          <p className="mt-1 whitespace-pre-line break-words text-ink-900">{withMentions(c.body)}</p>
        </li>
      ))}
    </ol>
  );
}
