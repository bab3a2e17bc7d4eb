import { StatusPage, notFoundText } from '@/components/shell/status-page';
import { Wordmark } from '@/components/shell/wordmark';

export default function NotFound() {
  return (
    <>
      <header className="surface-dark bg-ink-900 px-6 py-4">
        <Wordmark tone="light" />
      </header>
      <main id="main" className="px-4">
        <StatusPage code="404" title="Page not found">
          {notFoundText}
        </StatusPage>
      </main>
    </>
  );
}
