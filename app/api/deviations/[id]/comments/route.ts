import { parseId } from '@/lib/attachments/upload-request';
import { requireUser } from '@/lib/auth/session';
import { addComment } from '@/lib/comments/commands';
import { listComments } from '@/lib/comments/queries';
import { readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';

/*
 * GET /api/deviations/:id/comments → CommentDto[] (oldest first) for whoever may read the deviation.
 * POST { body } → 201 and the CommentDto; people written as @handle are e-mailed. 422 with
 * fieldErrors.body for an empty or over-long text or a mention of someone unknown or who cannot
 * read the deviation; 404 when the deviation is not visible.
 */

function deviationId(raw: string): number {
  const id = parseId(raw);
  if (id === null) throw new NotFoundError('This deviation');
  return id;
}

export async function GET(_request: Request, { params }: RouteContext<'/api/deviations/[id]/comments'>) {
  return respond(async () => {
    const user = await requireUser();
    return listComments('deviation', deviationId((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/deviations/[id]/comments'>) {
  return respond(async () => {
    const user = await requireUser();
    const recordId = deviationId((await params).id);
    const raw = await readJson(request);
    const body = raw && typeof raw === 'object' && 'body' in raw ? (raw as { body: unknown }).body : undefined;
    return addComment(user, { recordType: 'deviation', recordId, body: body as string });
  }, 201);
}
