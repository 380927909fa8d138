import { describe, expect, it } from 'vitest';
import { footprintTemplate, pitchMmOf } from '@/lib/fleet/footprint';
import { CSV_COLUMNS, machinesToCsv, parseMachinesCsv, type ExportRow } from '@/lib/fleet/machines-csv';

const SITE_ID = '11111111-1111-4111-8111-111111111111';
const sites = (customer: string, site: string) => (customer === 'Acme Demo Works' && site === 'Hall 1' ? SITE_ID : undefined);

function rowsFor(serial: string, n: 4 | 6 | 8): ExportRow[] {
  return footprintTemplate(n, 2000, 1600, n === 6 ? { unit: 'tpi', value: 8 } : { unit: 'mm', value: 3 }).map((s) => ({
    serial,
    model: 'Test VMC',
    customer: 'Acme Demo Works',
    site: 'Hall 1',
    tableLengthMm: 1000,
    tableWidthMm: 500,
    travelXMm: 800,
    travelYMm: 500,
    travelZMm: 500,
    checkIntervalMonths: 9,
    priorLeveledOn: '2026-03-01',
    screw: { label: s.label, kind: s.kind, xMm: s.xMm, yMm: s.yMm, pitchMm: pitchMmOf(s.thread), threadTpi: s.thread.unit === 'tpi' ? s.thread.value : null, liftPerTurnMm: null, specHeightMm: 80 },
  }));
}

describe('machine CSV', () => {
  it('writes the header and one row per screw, and reads back the same machines', () => {
    const csv = machinesToCsv([...rowsFor('A-1', 4), ...rowsFor('B-2', 6)]);
    expect(csv.split('\r\n')[0]).toBe(CSV_COLUMNS.join(','));
    expect(csv.split('\r\n')).toHaveLength(1 + 4 + 6);
    const parsed = parseMachinesCsv(csv, sites);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.machines.map((m) => [m.serial, m.screws.length, m.siteId, m.line])).toEqual([
      ['A-1', 4, SITE_ID, 2],
      ['B-2', 6, SITE_ID, 6],
    ]);
    expect(parsed.machines[1]!.screws[0]!.thread).toEqual({ unit: 'tpi', value: 8 });
  });

  it('refuses the whole file, naming each bad row by line and column', () => {
    const lines = machinesToCsv([...rowsFor('A-1', 4), ...rowsFor('B-2', 4)]).split('\r\n');
    lines[3] = lines[3]!.replace(',corner,', ',wobbly,'); // line 4: A-1's third screw
    lines[7] = lines[7]!.replace(',9,', ',forty,'); // line 8: B-2's second row disagrees and is not a number
    const parsed = parseMachinesCsv(lines.join('\r\n'), sites);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.problems).toEqual(
      expect.arrayContaining([
        { line: 4, field: 'screw_kind', message: 'must be corner, middle or outrigger' },
        { line: 8, field: 'check_interval_months', message: 'differs from line 6 for machine B-2' },
      ]),
    );
  });

  it('names an unknown site and a missing column', () => {
    const csv = machinesToCsv(rowsFor('A-1', 4).map((r) => ({ ...r, site: 'Hall 9' })));
    const unknown = parseMachinesCsv(csv, sites);
    expect(unknown).toEqual({ ok: false, problems: [{ line: 2, field: 'site', message: 'no site "Hall 9" for customer "Acme Demo Works" in this organisation' }] });
    const noKind = csv.replace('screw_kind', 'kind');
    expect(parseMachinesCsv(noKind, sites)).toEqual({ ok: false, problems: [{ line: 1, field: 'screw_kind', message: 'missing column: screw_kind' }] });
  });

  it('refuses a machine whose screws lie on one line, pointing at the machine', () => {
    const rows = rowsFor('A-1', 4).map((r, i) => ({ ...r, screw: { ...r.screw, xMm: i * 400, yMm: 0 } }));
    const parsed = parseMachinesCsv(machinesToCsv(rows), sites);
    expect(parsed).toEqual({ ok: false, problems: [{ line: 2, field: 'footprint', message: 'machine A-1: the screws lie on one line, so they cannot hold a plane' }] });
  });

  it('escapes cells that a spreadsheet would run as a formula (OWASP CSV injection)', () => {
    const csv = machinesToCsv(rowsFor('=HYPERLINK("x")', 4));
    expect(csv).toContain(`"'=HYPERLINK(""x"")"`);
  });
});
