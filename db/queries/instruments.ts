import { and, asc, count, desc, eq, gt, gte, ilike, lt, lte, or, type SQL } from 'drizzle-orm';
import type { Db } from '../client';
import { instruments, type Instrument } from '../schema';
import { AppError } from '@/lib/errors';
import { likePattern, type ListQuery, type Page } from '@/lib/list-query';
import { calibrationStatus, DUE_SOON_DAYS } from '@/lib/fleet/calibration';
import { addDays } from '@/lib/dates';
import type { InstrumentStatusFilter, InstrumentView } from '@/lib/fleet/instruments';
import type { SlopeUnit } from '@/lib/leveling';

type Columns = Omit<typeof instruments.$inferInsert, 'id' | 'organisationId' | 'createdAt'>;

/** An instrument row as the routes answer it, with its calibration status on `today`. */
export function toInstrumentView(row: Instrument, today: string): InstrumentView {
  return {
    id: row.id,
    kind: row.kind,
    model: row.model,
    serial: row.serial,
    sensitivityValue: row.sensitivityValue,
    sensitivityUnit: row.sensitivityUnit as SlopeUnit | null,
    vialCount: row.vialCount,
    resolutionUm: row.resolutionUm,
    rangeMm: row.rangeMm,
    calibratedOn: row.calibratedOn,
    calibrationDue: row.calibrationDue,
    status: calibrationStatus(row.calibrationDue, today),
    active: row.active,
    certificate: row.certificateKey ? { name: row.certificateName ?? 'certificate', type: row.certificateType ?? 'application/octet-stream', bytes: row.certificateBytes ?? 0 } : null,
  };
}

const sortColumns = {
  model: instruments.model,
  serial: instruments.serial,
  kind: instruments.kind,
  calibrationDue: instruments.calibrationDue,
} as const;

/** One page of an organisation's instruments, filtered, sorted and paged in PostgreSQL. */
export async function listInstrumentsByOrganisation(
  db: Db,
  {
    organisationId,
    query,
    kind,
    status,
    today,
  }: { organisationId: string; query: ListQuery<keyof typeof sortColumns>; kind?: 'level' | 'indicator'; status?: InstrumentStatusFilter; today: string },
): Promise<Page<InstrumentView>> {
  const where: (SQL | undefined)[] = [eq(instruments.organisationId, organisationId), eq(instruments.active, status !== 'retired')];
  if (query.q) where.push(or(ilike(instruments.model, likePattern(query.q)), ilike(instruments.serial, likePattern(query.q))));
  if (kind) where.push(eq(instruments.kind, kind));
  const soon = addDays(today, DUE_SOON_DAYS);
  if (status === 'expired') where.push(lt(instruments.calibrationDue, today));
  if (status === 'due-soon') where.push(gte(instruments.calibrationDue, today), lte(instruments.calibrationDue, soon));
  if (status === 'current') where.push(gt(instruments.calibrationDue, soon));
  const filter = and(...where);
  const order = query.dir === 'desc' ? desc : asc;
  const [rows, [total]] = await Promise.all([
    db
      .select()
      .from(instruments)
      .where(filter)
      .orderBy(order(sortColumns[query.sort]), asc(instruments.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ n: count() }).from(instruments).where(filter),
  ]);
  return { rows: rows.map((r) => toInstrumentView(r, today)), total: total?.n ?? 0, page: query.page, pageSize: query.pageSize };
}

/** One instrument of the organisation, or null (absent or another organisation's). */
export async function getInstrumentForOrganisation(db: Db, { instrumentId, organisationId }: { instrumentId: string; organisationId: string }) {
  const [row] = await db
    .select()
    .from(instruments)
    .where(and(eq(instruments.id, instrumentId), eq(instruments.organisationId, organisationId)));
  return row ?? null;
}

function isUniqueViolation(e: unknown): boolean {
  const err = e as { code?: string; cause?: { code?: string } };
  return err?.code === '23505' || err?.cause?.code === '23505';
}

const duplicate = (serial: string, kind: string) =>
  new AppError('conflict:instrument', `serial: another ${kind} with serial ${serial} is already on record`, 'serial');

export async function insertInstrument(db: Db, { organisationId, values }: { organisationId: string; values: Columns }) {
  try {
    const [row] = await db.insert(instruments).values({ ...values, organisationId }).returning();
    return row!;
  } catch (e) {
    if (isUniqueViolation(e)) throw duplicate(values.serial, values.kind);
    throw e;
  }
}

/** Updates an instrument of the organisation; null when there is no such instrument. */
export async function updateInstrument(db: Db, { instrumentId, organisationId, values }: { instrumentId: string; organisationId: string; values: Partial<Columns> }) {
  try {
    const [row] = await db
      .update(instruments)
      .set(values)
      .where(and(eq(instruments.id, instrumentId), eq(instruments.organisationId, organisationId)))
      .returning();
    return row ?? null;
  } catch (e) {
    if (isUniqueViolation(e)) throw duplicate(values.serial ?? '', values.kind ?? 'instrument');
    throw e;
  }
}

/** Records an instrument's calibration certificate (the previous one's key is simply replaced). */
export async function setInstrumentCertificate(
  db: Db,
  { instrumentId, organisationId, certificate }: { instrumentId: string; organisationId: string; certificate: { key: string; name: string; type: string; bytes: number } },
) {
  return updateInstrument(db, {
    instrumentId,
    organisationId,
    values: { certificateKey: certificate.key, certificateName: certificate.name, certificateType: certificate.type, certificateBytes: certificate.bytes },
  });
}
