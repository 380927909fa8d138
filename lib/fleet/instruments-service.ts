import type { Db } from '@/db/client';
import { getInstrumentForOrganisation, setInstrumentCertificate, updateInstrument } from '@/db/queries/instruments';
import { AppError, fromZod } from '@/lib/errors';
import { checkUpload, putObject, UPLOAD_TYPES } from '@/lib/storage';
import { instrumentColumns, instrumentInput, safeFileName, type InstrumentPatch } from './instruments';

/**
 * Applies a change to an instrument: the patch is merged with the stored record and checked whole
 * (a level keeps needing its sensitivity), so a partial change cannot leave an impossible instrument.
 */
export async function changeInstrument(db: Db, { organisationId, instrumentId, patch }: { organisationId: string; instrumentId: string; patch: InstrumentPatch }) {
  const current = await getInstrumentForOrganisation(db, { instrumentId, organisationId });
  if (!current) throw new AppError('not_found:instrument', 'No such instrument');
  const { active, ...fields } = patch;
  const merged = instrumentInput.safeParse({
    kind: current.kind,
    model: current.model,
    serial: current.serial,
    sensitivityValue: current.sensitivityValue,
    sensitivityUnit: current.sensitivityUnit,
    vialCount: current.vialCount,
    resolutionUm: current.resolutionUm,
    rangeMm: current.rangeMm,
    calibratedOn: current.calibratedOn,
    calibrationDue: current.calibrationDue,
    ...fields,
  });
  if (!merged.success) throw fromZod(merged.error, 'instrument');
  const row = await updateInstrument(db, {
    instrumentId,
    organisationId,
    values: { ...instrumentColumns(merged.data), ...(active === undefined ? {} : { active }) },
  });
  if (!row) throw new AppError('not_found:instrument', 'No such instrument');
  return row;
}

/**
 * Stores an uploaded calibration certificate: the type is decided from the bytes (PDF, PNG, JPEG or WebP,
 * at most 10 MB), the object gets a random key, and the record points at it from now on.
 */
export async function storeCertificate(db: Db, { organisationId, instrumentId, file }: { organisationId: string; instrumentId: string; file: File }) {
  const current = await getInstrumentForOrganisation(db, { instrumentId, organisationId });
  if (!current) throw new AppError('not_found:instrument', 'No such instrument');
  const bytes = new Uint8Array(await file.arrayBuffer());
  const type = await checkUpload(bytes, 'file');
  const key = await putObject('certificates', bytes, type);
  const row = await setInstrumentCertificate(db, {
    instrumentId,
    organisationId,
    certificate: { key, name: safeFileName(file.name, UPLOAD_TYPES[type]), type, bytes: bytes.byteLength },
  });
  if (!row) throw new AppError('not_found:instrument', 'No such instrument');
  return row;
}
