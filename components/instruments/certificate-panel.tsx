'use client';

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import type { InstrumentView } from '@/lib/fleet/instruments';
import { formatBytes } from './format';
import { INSTRUMENTS_KEY } from './instruments-table';

const MAX_BYTES = 10 * 1024 * 1024;

async function uploadCertificate(instrumentId: string, file: File) {
  const form = new FormData();
  form.set('file', file);
  const res = await fetch(`/api/instruments/${instrumentId}/certificate`, { method: 'PUT', body: form, credentials: 'same-origin' });
  const data = (await res.json().catch(() => null)) as { detail?: string; instrument?: InstrumentView } | null;
  if (!res.ok) throw new Error((data?.detail ?? `Upload failed (${res.status})`).replace(/^file: /, ''));
  return data!.instrument!;
}

/** The calibration certificate on file, and (for an admin) the upload that replaces it. The server decides the type from the bytes. */
export function CertificatePanel({ instrument, mayUpload }: { instrument: InstrumentView; mayUpload: boolean }) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const input = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const [localError, setLocalError] = useState<string | null>(null);
  const upload = useMutation({
    mutationFn: (f: File) => uploadCertificate(instrument.id, f),
    onSuccess: async () => {
      setFile(null);
      if (input.current) input.current.value = '';
      await queryClient.invalidateQueries({ queryKey: INSTRUMENTS_KEY });
      router.refresh();
    },
  });
  // The answer of the upload shows at once; the page refresh that follows brings the same record.
  const cert = (upload.data ?? instrument).certificate;
  const error = localError ?? upload.error?.message ?? null;

  return (
    <section aria-labelledby="certificate-h" className="grid gap-3 rounded-xl border-2 border-rule bg-card p-4 sm:p-6">
      <h2 id="certificate-h" className="text-xl font-bold">
        Calibration certificate
      </h2>
      {cert ? (
        <p data-testid="certificate" className="flex flex-wrap items-center gap-3">
          <span className="font-semibold">{cert.name}</span>
          <span className="text-ink-soft">
            {formatBytes(cert.bytes)} · {cert.type}
          </span>
          <a href={`/api/instruments/${instrument.id}/certificate`} download className="inline-flex min-h-12 items-center font-semibold text-spirit underline underline-offset-4">
            Download
          </a>
        </p>
      ) : (
        <p data-testid="certificate" className="text-ink-soft">
          No certificate on file.
        </p>
      )}
      {mayUpload && (
        <form
          className="grid gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            if (file && !localError) upload.mutate(file);
          }}
        >
          <label className="grid gap-1 font-semibold">
            {cert ? 'Replace with a new certificate' : 'Upload the certificate'}
            <input
              ref={input}
              type="file"
              name="file"
              accept="application/pdf,image/png,image/jpeg,image/webp"
              onChange={(e) => {
                const f = e.target.files?.[0] ?? null;
                upload.reset();
                setFile(f);
                setLocalError(f && f.size > MAX_BYTES ? `${f.name} is ${formatBytes(f.size)}; a certificate may be at most 10 MB` : null);
              }}
              className="min-h-12 w-full min-w-0 rounded-lg border-2 border-dashed border-ink bg-paper p-2 text-lg font-normal file:mr-3 file:min-h-10 file:rounded-md file:border-0 file:bg-steel file:px-4 file:font-semibold file:text-paper"
            />
            <span className="text-sm font-normal text-ink-soft">PDF, PNG, JPEG or WebP, at most 10 MB.</span>
          </label>
          {file && (
            <p className="text-ink-soft" data-testid="chosen-file">
              Chosen: <span className="font-semibold text-ink">{file.name}</span> ({formatBytes(file.size)})
            </p>
          )}
          {error && (
            <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
              Not stored: {error}
            </p>
          )}
          {upload.isSuccess && (
            <p role="status" className="font-semibold text-pass">
              Certificate stored.
            </p>
          )}
          <div>
            <Button type="submit" disabled={!file || Boolean(localError) || upload.isPending}>
              {upload.isPending ? 'Uploading…' : 'Upload certificate'}
            </Button>
          </div>
        </form>
      )}
    </section>
  );
}
