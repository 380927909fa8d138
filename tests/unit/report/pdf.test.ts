// The report PDF drawn from a session the virtual technician played out, read back with pdf-parse.
import { evaluate, unit } from 'mathjs';
import { PDFParse } from 'pdf-parse';
import { describe, expect, it } from 'vitest';
import { formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { measureText, pdfSafe, turnsText } from '@/lib/report/format';
import { reportFileName, reportInputOfLog, type ReportInput } from '@/lib/report/model';
import { renderReportPdf } from '@/lib/report/pdf';
import type { SessionEvent } from '@/lib/session/events';
import { eventHash } from '@/lib/session/hash-chain';
import { simulatedLog } from './simulated-log';

/** The simulated log, approved an hour after it ended, chained as the server chains it (lib/session/hash-chain). */
function approvedLog({ approve = true } = {}): SessionEvent[] {
  const events = [...simulatedLog().events];
  const last = events[events.length - 1]!;
  if (approve) {
    events.push({
      ...last,
      seq: last.seq + 1,
      id: 'approval',
      type: 'review:approved',
      actorRole: 'reviewer',
      payload: { name: 'Reviewer Quill', signature: { width: 300, height: 100, strokes: [[10, 60, 40, 20, 70, 80], [150, 50, 260, 60]] } },
      serverTs: new Date(Date.parse(last.serverTs) + 3_600_000).toISOString(),
    } as SessionEvent);
  }
  let prev = '';
  return events.map((e) => {
    const chained = { ...e, prevHash: prev, hash: eventHash(prev, e) };
    prev = chained.hash;
    return chained;
  });
}

function inputOf(events: SessionEvent[], units: UnitSystem): ReportInput {
  return reportInputOfLog(events, {
    units,
    generatedAt: new Date('2026-03-04T09:00:00Z'),
    organisation: 'Fixture Leveling Services',
    customer: 'Fixture Gear Works',
    site: { name: 'Hall B', address: '1 Fixture Road' },
    machine: { model: 'Fixture VMC', serial: 'FX/0042 A' },
    technician: 'Fixture Technician',
    visitDate: '2026-03-03',
    instruments: [{ kind: 'level', model: 'Fixture level', serial: 'LV-9', calibratedOn: '2025-09-01', calibrationDue: '2026-09-01' }],
  });
}

async function textOf(pdf: Buffer): Promise<string> {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  try {
    // pdf.js reads µ (U+00B5) back as Greek mu (U+03BC); fold it back before comparing.
    return (await parser.getText()).text.replace(/\u03bc/g, 'µ');
  } finally {
    await parser.destroy();
  }
}

describe('renderReportPdf', () => {
  const events = approvedLog();

  it.each(['metric', 'inch'] as const)('holds every as-left figure in %s units as the summary gives it, and the parties', async (units) => {
    const input = inputOf(events, units);
    const pdf = await renderReportPdf(input);
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    const text = await textOf(pdf);
    for (const row of input.summary.measures) {
      expect(row.asLeft.value, row.measure).not.toBeNull();
      const v = row.asLeft.value!;
      // The magnitude through lib/leveling's display helpers, the units the views use.
      const magnitude = row.unit === 'urad' ? formatSlope(Math.abs(v), units) : formatLength(Math.abs(v), units);
      expect(text, row.measure).toContain(magnitude);
    }
    for (const s of ['Fixture Leveling Services', 'Fixture Gear Works', 'Hall B, 1 Fixture Road', 'Fixture VMC, serial FX/0042 A', 'Visit date 2026-03-03', 'Fixture Technician', 'LV-9', '2025-09-01', '2026-09-01']) {
      expect(text).toContain(s);
    }
    expect(text).toContain(units === 'inch' ? 'inch: slopes in in/10 in' : 'metric: slopes in mm/m');
    expect(text).toContain('As left: PASS');
  });

  it('states the chain head and the event count verifyChain gives, the approval and the safety line', async () => {
    const input = inputOf(events, 'metric');
    const text = await textOf(await renderReportPdf(input));
    expect(input.chain.ok).toBe(true);
    expect(text).toContain(events[events.length - 1]!.hash);
    expect(text).toContain(`${events.length} in the session’s log, hash chain verified`);
    expect(text).toMatch(/Reviewer Quill\s+approved at \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
    expect(text).toContain('Approved');
    expect(text).not.toContain('Not yet approved');
    expect(text).toMatch(/Levelwire advises; it does not replace the machine builder’s instructions, local codes/);
  });

  it('gives each screw’s total turns in the top view and the moves table (turns summed from the answers)', async () => {
    const input = inputOf(events, 'metric');
    const text = await textOf(await renderReportPdf(input));
    for (const m of input.summary.moves.byScrew.filter((x) => x.done > 0)) expect(text).toContain(`${turnsText(m.turns)} turn`);
  });

  it('says “not yet approved” before the approval, and names a broken chain', async () => {
    const unapproved = approvedLog({ approve: false });
    const text = await textOf(await renderReportPdf(inputOf(unapproved, 'metric')));
    expect(text).toContain('Draft: not yet approved');
    expect(text).toContain('Not yet approved');
    const tampered = unapproved.map((e) => (e.seq === 5 ? { ...e, payload: { ...(e.payload as object), done: false } } : e)) as SessionEvent[];
    expect(await textOf(await renderReportPdf(inputOf(tampered, 'metric')))).toContain('The hash chain does not verify: broken at event 5');
  });

  it('writes the twist in in/10 in as mathjs converts it (TRADE.md §2: 1 in/10 in = 100,000 µrad)', async () => {
    const input = inputOf(events, 'inch');
    const twist = input.summary.measures.find((m) => m.measure === 'twist')!.asLeft.value!;
    const inPer10In = (unit(twist * 1e-6, 'rad').toNumber('rad') as number) / (evaluate('1 inch / (10 inch)') as number);
    const text = await textOf(await renderReportPdf(input));
    expect(text).toContain(`${inPer10In.toFixed(5)} in/10 in`);
  });

  it('names its file by the machine serial and the visit date, in safe characters', () => {
    expect(reportFileName(inputOf(events, 'metric'))).toBe('levelwire-report-FX-0042-A-2026-03-03.pdf');
  });
});

describe('report text helpers', () => {
  it('turns signs into what the standard PDF fonts draw', () => {
    expect(pdfSafe('−0.5 ≤ 1 → µ ± ° – ’')).toBe('-0.5 <= 1 -> µ ± ° – ’');
    expect(pdfSafe('▲')).toBe('?');
  });
  it('signs a figure only when its shown digits are not all zero', () => {
    expect(measureText(-0.1, { unit: 'um', signed: true }, 'inch')).toBe('0.0000 in');
    expect(measureText(-0.001, { unit: 'urad', signed: true }, 'inch')).toBe('0.00000 in/10 in'); // not fooled by the 1 of "10 in"
    expect(measureText(-2, { unit: 'urad', signed: true }, 'inch')).toBe('-0.00002 in/10 in');
    expect(measureText(-25.4, { unit: 'um', signed: true }, 'inch')).toBe('-0.0010 in'); // 25.4 µm = 0.001 in (NIST)
    expect(measureText(20, { unit: 'urad', signed: true }, 'metric')).toBe('+0.020 mm/m'); // 20 µrad = 0.02 mm/m (TRADE.md §2)
    expect(measureText(20, { unit: 'urad', signed: false }, 'inch')).toBe('0.00020 in/10 in'); // TRADE.md §2 table
  });
});
