'use client';

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRef, useState } from 'react';
import type { CsvProblem } from '@/lib/fleet/machines-csv';

type Result = { created: number; updated: number };

/** Uploads a machine CSV; a file with any bad row is refused whole and every problem is listed by line. */
export function CsvImport() {
  const queryClient = useQueryClient();
  const input = useRef<HTMLInputElement>(null);
  const [problems, setProblems] = useState<CsvProblem[]>([]);
  const run = useMutation({
    mutationFn: async (file: File): Promise<Result> => {
      const res = await fetch('/api/machines/import', { method: 'POST', headers: { 'content-type': 'text/csv' }, body: await file.text() });
      const data = (await res.json()) as Result & { detail?: string; problems?: CsvProblem[] };
      if (!res.ok) {
        setProblems(data.problems ?? [{ line: 0, field: 'file', message: data.detail ?? `refused (${res.status})` }]);
        throw new Error(data.detail ?? 'Import refused');
      }
      setProblems([]);
      return data;
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['machines'] }),
  });
  return (
    <div className="grid gap-2">
      <label className="inline-flex min-h-12 cursor-pointer items-center rounded-lg border-2 border-ink bg-card px-4 font-semibold hover:bg-paper">
        Import CSV
        <input
          ref={input}
          type="file"
          accept=".csv,text/csv"
          className="sr-only"
          onChange={(e) => {
            const file = e.target.files?.[0];
            if (file) run.mutate(file);
            if (input.current) input.current.value = '';
          }}
        />
      </label>
      {run.isPending && <p role="status">Importing…</p>}
      {run.isSuccess && (
        <p role="status" className="font-semibold text-pass">
          Imported: {run.data.created} new, {run.data.updated} updated.
        </p>
      )}
      {problems.length > 0 && (
        <div role="alert" className="max-w-xl rounded-lg bg-fail/10 p-3 text-fail">
          <p className="font-bold">Nothing was imported: fix these rows and try again.</p>
          <ul className="mt-1 list-disc pl-5">
            {problems.map((p) => (
              <li key={`${p.line}-${p.field}-${p.message}`}>
                line {p.line}, {p.field}: {p.message}
              </li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
