'use client';

import { StatusPage } from '@/components/shell/status-page';
import { Button } from '@/components/ui/button';

/*
 * Unexpected failures only: domain errors are shown where they happen. The digest is the
 * reference the server logged, so support can find the cause.
 */
export default function AppError({ error, retry }: { error: Error & { digest?: string }; retry: () => void }) {
  return (
    <StatusPage title="This page could not be shown">
      <p>Something went wrong on our side. If you were saving something, check whether it was saved before entering it again.</p>
      {error.digest ? (
        <p>
          If it happens again, report reference <span className="font-mono font-semibold">{error.digest}</span>.
        </p>
      ) : null}
      <div>
        <Button variant="secondary" onClick={() => retry()}>
          Try again
        </Button>
      </div>
    </StatusPage>
  );
}
