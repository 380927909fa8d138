import type { RenderedReport } from './service';

/** The PDF as a response: shown in the browser (inline) under its file name, never cached beyond the reader, never sniffed. */
export function pdfResponse(report: RenderedReport): Response {
  return new Response(new Uint8Array(report.pdf), {
    status: 200,
    headers: {
      'content-type': 'application/pdf',
      'content-length': String(report.pdf.byteLength),
      'content-disposition': `inline; filename="${report.fileName}"`,
      'cache-control': 'private, no-store',
      'x-content-type-options': 'nosniff',
    },
  });
}
