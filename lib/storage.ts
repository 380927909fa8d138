import { randomUUID } from 'node:crypto';
import { GetObjectCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { fileTypeFromBuffer } from 'file-type';
import { AppError } from './errors';
import { env } from './env';

/** What Levelwire accepts as an upload, decided from the bytes, never from the name or the browser's word. */
export const UPLOAD_TYPES = { 'application/pdf': 'pdf', 'image/png': 'png', 'image/jpeg': 'jpg', 'image/webp': 'webp' } as const;
export type UploadType = keyof typeof UPLOAD_TYPES;
export const MAX_UPLOAD_BYTES = 10 * 1024 * 1024;

const key = Symbol.for('levelwire.s3');
type Holder = { [key]?: S3Client };

function client(): S3Client {
  const g = globalThis as Holder;
  const e = env();
  g[key] ??= new S3Client({
    region: e.S3_REGION,
    endpoint: e.S3_ENDPOINT,
    forcePathStyle: Boolean(e.S3_ENDPOINT),
    credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
  });
  return g[key]!;
}

/** Checks an upload's size and content type (from its magic bytes); throws a 400 naming the problem. */
export async function checkUpload(bytes: Uint8Array, field = 'file'): Promise<UploadType> {
  if (bytes.byteLength === 0) throw new AppError('bad_request:upload', `${field}: the file is empty`, field);
  if (bytes.byteLength > MAX_UPLOAD_BYTES) throw new AppError('bad_request:upload', `${field}: larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB`, field);
  const found = await fileTypeFromBuffer(bytes);
  if (!found || !(found.mime in UPLOAD_TYPES)) {
    throw new AppError('bad_request:upload', `${field}: must be a PDF, PNG, JPEG or WebP file (found ${found?.mime ?? 'unknown content'})`, field);
  }
  return found.mime as UploadType;
}

/** Stores bytes under a random key in `folder`; returns the key. */
export async function putObject(folder: string, bytes: Uint8Array, contentType: UploadType): Promise<string> {
  const objectKey = `${folder}/${randomUUID()}.${UPLOAD_TYPES[contentType]}`;
  await client().send(new PutObjectCommand({ Bucket: env().S3_BUCKET, Key: objectKey, Body: bytes, ContentType: contentType }));
  return objectKey;
}

/** Reads a stored object whole (uploads are capped at MAX_UPLOAD_BYTES). */
export async function getObject(objectKey: string): Promise<Uint8Array> {
  const res = await client().send(new GetObjectCommand({ Bucket: env().S3_BUCKET, Key: objectKey }));
  if (!res.Body) throw new AppError('not_found:object', 'The stored file is missing');
  return res.Body.transformToByteArray();
}
