/* One label and value of a record's facts, inside a two-column <dl> grid. */

export function DetailRow({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <>
      <dt className="text-ink-600">{label}</dt>
      <dd className="min-w-0 break-words">{children}</dd>
    </>
  );
}
