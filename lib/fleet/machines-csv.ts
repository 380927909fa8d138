import Papa from 'papaparse';
import type { ScrewInput } from './footprint';
import { machineInput, type MachineInput } from './machines';

/**
 * Levelwire's machine CSV: one row per leveling screw; a machine's own columns repeat on each of its rows
 * and must agree. Lengths in mm. The site is named by its customer and site names.
 */
export const CSV_COLUMNS = [
  'serial',
  'model',
  'customer',
  'site',
  'table_length_mm',
  'table_width_mm',
  'travel_x_mm',
  'travel_y_mm',
  'travel_z_mm',
  'check_interval_months',
  'prior_leveled_on',
  'screw_label',
  'screw_kind',
  'screw_x_mm',
  'screw_y_mm',
  'thread_unit',
  'thread_value',
  'lift_per_turn_mm',
  'spec_height_mm',
] as const;
type Column = (typeof CSV_COLUMNS)[number];
type Row = Record<Column, string>;

export type CsvProblem = { line: number; field: string; message: string };
export type ParsedImport = { ok: true; machines: (MachineInput & { line: number })[] } | { ok: false; problems: CsvProblem[] };

export type ExportRow = {
  serial: string;
  model: string;
  customer: string;
  site: string;
  tableLengthMm: number;
  tableWidthMm: number;
  travelXMm: number;
  travelYMm: number;
  travelZMm: number;
  checkIntervalMonths: number;
  priorLeveledOn: string | null;
  screw: { label: string; kind: string; xMm: number; yMm: number; pitchMm: number; threadTpi: number | null; liftPerTurnMm: number | null; specHeightMm: number | null };
};

/** The CSV text for the given rows (RFC 4180 quoting by papaparse; formula-like cells are escaped). */
export function machinesToCsv(rows: ExportRow[]): string {
  const data = rows.map((r) => [
    r.serial,
    r.model,
    r.customer,
    r.site,
    r.tableLengthMm,
    r.tableWidthMm,
    r.travelXMm,
    r.travelYMm,
    r.travelZMm,
    r.checkIntervalMonths,
    r.priorLeveledOn ?? '',
    r.screw.label,
    r.screw.kind,
    r.screw.xMm,
    r.screw.yMm,
    r.screw.threadTpi === null ? 'mm' : 'tpi',
    r.screw.threadTpi ?? r.screw.pitchMm,
    r.screw.liftPerTurnMm ?? '',
    r.screw.specHeightMm ?? '',
  ]);
  return Papa.unparse({ fields: [...CSV_COLUMNS], data }, { escapeFormulae: true, newline: '\r\n' });
}

const num = (v: string) => (v.trim() === '' ? Number.NaN : Number(v.trim()));
const optionalNum = (v: string) => (v.trim() === '' ? null : Number(v.trim()));

/** Which CSV column a schema path points at, so a problem names the column the person typed in. */
function columnOf(path: PropertyKey[]): string {
  const [head, , leaf, sub] = path.map(String);
  const machineFields: Record<string, Column> = {
    siteId: 'site',
    model: 'model',
    serial: 'serial',
    tableLengthMm: 'table_length_mm',
    tableWidthMm: 'table_width_mm',
    travelXMm: 'travel_x_mm',
    travelYMm: 'travel_y_mm',
    travelZMm: 'travel_z_mm',
    checkIntervalMonths: 'check_interval_months',
    priorLeveledOn: 'prior_leveled_on',
  };
  if (head !== 'screws') return machineFields[head ?? ''] ?? head ?? 'row';
  const screwFields: Record<string, Column> = { label: 'screw_label', kind: 'screw_kind', xMm: 'screw_x_mm', yMm: 'screw_y_mm', liftPerTurnMm: 'lift_per_turn_mm', specHeightMm: 'spec_height_mm' };
  if (leaf === 'thread') return sub === 'unit' ? 'thread_unit' : 'thread_value';
  return leaf ? (screwFields[leaf] ?? leaf) : 'screw_label';
}

/**
 * Parses and checks a whole file. Any problem refuses the file: every bad row is reported by its line
 * number (the header is line 1) and column, and nothing is returned to store.
 */
export function parseMachinesCsv(text: string, siteIdFor: (customer: string, site: string) => string | undefined): ParsedImport {
  const parsed = Papa.parse<Row>(text.replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: 'greedy', transformHeader: (h) => h.trim().toLowerCase() });
  const problems: CsvProblem[] = [];
  const headers = parsed.meta.fields ?? [];
  const missing = CSV_COLUMNS.filter((c) => !headers.includes(c));
  if (missing.length > 0) return { ok: false, problems: [{ line: 1, field: missing.join(', '), message: `missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}` }] };
  if (parsed.data.length === 0) return { ok: false, problems: [{ line: 2, field: 'row', message: 'the file has no machine rows' }] };
  for (const err of parsed.errors) problems.push({ line: (err.row ?? 0) + 2, field: 'row', message: err.message });

  // Group rows by serial, keeping each row's line (papaparse's cursor gives where each record starts).
  const lineOfRow: number[] = [];
  let line = 2;
  for (const row of parsed.data) {
    lineOfRow.push(line);
    line += 1 + Object.values(row).reduce((n, v) => n + (typeof v === 'string' ? (v.match(/\n/g)?.length ?? 0) : 0), 0);
  }
  const groups = new Map<string, { rows: Row[]; lines: number[] }>();
  parsed.data.forEach((row, i) => {
    const serial = (row.serial ?? '').trim();
    if (!serial) {
      problems.push({ line: lineOfRow[i]!, field: 'serial', message: 'must not be empty' });
      return;
    }
    const g = groups.get(serial) ?? { rows: [], lines: [] };
    g.rows.push(row);
    g.lines.push(lineOfRow[i]!);
    groups.set(serial, g);
  });

  const machines: (MachineInput & { line: number })[] = [];
  const machineColumns: Column[] = ['model', 'customer', 'site', 'table_length_mm', 'table_width_mm', 'travel_x_mm', 'travel_y_mm', 'travel_z_mm', 'check_interval_months', 'prior_leveled_on'];
  for (const [serial, { rows, lines }] of groups) {
    const first = rows[0]!;
    rows.forEach((r, i) => {
      for (const c of machineColumns) {
        if ((r[c] ?? '').trim() !== (first[c] ?? '').trim()) problems.push({ line: lines[i]!, field: c, message: `differs from line ${lines[0]} for machine ${serial}` });
      }
    });
    const siteId = siteIdFor(first.customer ?? '', first.site ?? '');
    if (!siteId) {
      problems.push({ line: lines[0]!, field: 'site', message: `no site "${first.site}" for customer "${first.customer}" in this organisation` });
    }
    const screws: ScrewInput[] = rows.map((r) => ({
      label: (r.screw_label ?? '').trim(),
      kind: (r.screw_kind ?? '').trim() as ScrewInput['kind'],
      xMm: num(r.screw_x_mm ?? ''),
      yMm: num(r.screw_y_mm ?? ''),
      thread: { unit: (r.thread_unit ?? '').trim() as 'mm' | 'tpi', value: num(r.thread_value ?? '') },
      liftPerTurnMm: optionalNum(r.lift_per_turn_mm ?? ''),
      specHeightMm: optionalNum(r.spec_height_mm ?? ''),
    }));
    const candidate = {
      siteId: siteId ?? '00000000-0000-4000-8000-000000000000',
      model: first.model ?? '',
      serial,
      tableLengthMm: num(first.table_length_mm ?? ''),
      tableWidthMm: num(first.table_width_mm ?? ''),
      travelXMm: num(first.travel_x_mm ?? ''),
      travelYMm: num(first.travel_y_mm ?? ''),
      travelZMm: num(first.travel_z_mm ?? ''),
      checkIntervalMonths: num(first.check_interval_months ?? ''),
      priorLeveledOn: (first.prior_leveled_on ?? '').trim() || null,
      screws,
    };
    const result = machineInput.safeParse(candidate);
    if (!result.success) {
      for (const issue of result.error.issues) {
        const screwIndex = issue.path[0] === 'screws' && typeof issue.path[1] === 'number' ? issue.path[1] : undefined;
        const wholeFootprint = issue.path[0] === 'screws' && screwIndex === undefined;
        problems.push({
          line: screwIndex !== undefined ? lines[screwIndex]! : lines[0]!,
          field: wholeFootprint ? 'footprint' : columnOf(issue.path),
          message: wholeFootprint ? `machine ${serial}: ${issue.message}` : issue.message,
        });
      }
    } else if (siteId) machines.push({ ...result.data, line: lines[0]! });
  }
  if (problems.length > 0) return { ok: false, problems: dedupe(problems).sort((a, b) => a.line - b.line) };
  return { ok: true, machines };
}

function dedupe(problems: CsvProblem[]): CsvProblem[] {
  const seen = new Set<string>();
  return problems.filter((p) => {
    const k = `${p.line}|${p.field}|${p.message}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}
