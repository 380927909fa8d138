/**
 * Download the session's record: the JSON file is the whole event log (another Levelwire can import it and verify its
 * hash chain), the CSV one row per reading. Plain links, so it renders on the server and works without script.
 */
export function ExportLinks({ sessionId, compact = false }: { sessionId: string; compact?: boolean }) {
  const link = `inline-flex items-center rounded-lg border-2 border-ink font-semibold hover:bg-paper ${compact ? 'min-h-10 px-3 text-sm' : 'min-h-12 px-4'}`;
  return (
    <span className="inline-flex flex-wrap items-center gap-2" data-testid="export-links">
      <span className={compact ? 'text-sm text-ink-soft' : 'font-semibold'}>Export</span>
      <a href={`/api/sessions/${sessionId}/export?format=json`} download className={link} title="The whole record: every event with its hash (importable)" aria-label="Export the record as JSON">
        {compact ? 'JSON' : 'JSON (record)'}
      </a>
      <a href={`/api/sessions/${sessionId}/export?format=csv`} download className={link} title="One row per reading, for a spreadsheet" aria-label="Export the readings as CSV">
        {compact ? 'CSV' : 'CSV (readings)'}
      </a>
    </span>
  );
}
