import Link from 'next/link';

/**
 * The due list in two numbers, for the start page: machines overdue (or never leveled) and machines due within
 * `soonDays`. Server-renderable; the page passes the counts from `countDueByStatus` (db/queries/due.ts).
 */
export function DueSummary({ overdue, dueSoon, soonDays, href = '/due', title = 'Due list' }: { overdue: number; dueSoon: number; soonDays: number; href?: string | null; title?: string }) {
  return (
    <section aria-labelledby="due-summary-h" className="rounded-xl border-2 border-rule bg-card p-4">
      <h2 id="due-summary-h" className="text-xl font-bold">
        {title}
      </h2>
      <div className="mt-2 flex flex-wrap items-center gap-x-6 gap-y-2">
        <p className="flex items-baseline gap-2" data-testid="due-overdue">
          <span className={`tabular text-3xl font-bold ${overdue > 0 ? 'text-fail' : 'text-pass'}`}>{overdue}</span>
          <span>overdue</span>
        </p>
        <p className="flex items-baseline gap-2" data-testid="due-soon">
          <span className={`tabular text-3xl font-bold ${dueSoon > 0 ? 'text-ink' : 'text-pass'}`}>{dueSoon}</span>
          <span>due within {soonDays} days</span>
        </p>
        {href && (
          <Link href={href} className="ml-auto inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold hover:bg-paper">
            Open the due list
          </Link>
        )}
      </div>
    </section>
  );
}
