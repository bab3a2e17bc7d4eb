export default function Loading() {
  return (
    <div role="status" className="flex items-center gap-3 py-10 text-ink-700">
      <span className="h-5 w-5 animate-spin rounded-full border-2 border-ink-300 border-t-ink-900" aria-hidden="true" />
      Loading…
    </div>
  );
}
