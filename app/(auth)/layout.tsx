import type { ReactNode } from 'react';
import { Wordmark } from '@/components/shell/wordmark';

export default function AuthLayout({ children }: { children: ReactNode }) {
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="surface-dark bg-ink-900 px-6 py-4">
        <Wordmark tone="light" />
      </header>
      <main id="main" className="flex flex-1 items-start justify-center px-4 py-10 sm:items-center">
        {children}
      </main>
    </div>
  );
}
