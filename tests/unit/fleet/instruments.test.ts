import { describe, expect, it } from 'vitest';
import { instrumentColumns, instrumentInput, safeFileName } from '@/lib/fleet/instruments';

describe('instrumentInput', () => {
  const level = { kind: 'level', model: 'Level', serial: 'LV-1', sensitivityValue: 0.02, sensitivityUnit: 'mm/m', calibrationDue: '2026-03-10' };

  it('takes a level and clears indicator fields when stored', () => {
    const parsed = instrumentInput.parse({ ...level, resolutionUm: 2 });
    expect(instrumentColumns(parsed)).toMatchObject({ sensitivityValue: 0.02, sensitivityUnit: 'mm/m', resolutionUm: null, rangeMm: null });
  });

  it.each([
    [{ sensitivityValue: undefined }, 'sensitivityValue'],
    [{ sensitivityValue: Number.NaN }, 'sensitivityValue'],
    [{ sensitivityUnit: 'deg' }, 'sensitivityUnit'],
    [{ vialCount: 1.5 }, 'vialCount'],
    [{ kind: 'indicator' }, 'resolutionUm'],
    [{ calibratedOn: '2026-03-11' }, 'calibrationDue'],
  ])('refuses %j naming %s', (patch, field) => {
    const res = instrumentInput.safeParse({ ...level, ...patch });
    expect(res.success).toBe(false);
    expect(res.error!.issues[0]!.path.join('.')).toBe(field);
  });
});

describe('safeFileName', () => {
  it.each([
    ['Calibration "2026" <LV>.pdf', 'pdf', 'Calibration 2026 LV.pdf'],
    ['scan.pdf', 'png', 'scan.png'],
    ['../../etc/passwd', 'pdf', 'passwd.pdf'],
    ['C:\\scans\\cert.jpeg', 'jpg', 'cert.jpg'],
    ['Prüfbericht Wasserwaage.pdf', 'pdf', 'Prufbericht Wasserwaage.pdf'],
    ['', 'jpg', 'certificate.jpg'],
    ['\r\nSet-Cookie: x.pdf', 'pdf', 'Set-Cookie x.pdf'],
  ])('%j as %s is %j', (name, ext, expected) => {
    expect(safeFileName(name, ext)).toBe(expected);
  });
});
