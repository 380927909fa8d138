// Loopback fakes for hosted services, started by `npm start`, `npm run dev` and `npm test`:
// an SMTP server that keeps every message as JSON in a folder, and an S3-compatible object store.
import { mkdirSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import S3rver from 's3rver';
import { SMTPServer } from 'smtp-server';

export type Fakes = { env: Record<string, string>; stop: () => Promise<void> };

/** Starts both fakes on free loopback ports; `root` holds the mailbox and the stored objects. */
export async function startFakes(root: string, bucket = 'levelwire'): Promise<Fakes> {
  const mailbox = path.resolve(root, 'mailbox');
  const objects = path.resolve(root, 's3');
  mkdirSync(mailbox, { recursive: true });
  mkdirSync(objects, { recursive: true });

  let count = 0;
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          count += 1;
          const to = session.envelope.rcptTo.map((r) => r.address);
          const record = {
            id: `${Date.now()}-${count}`,
            receivedAt: new Date().toISOString(),
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            to,
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : '',
            // Attachments are written beside the message, so tests (and /admin/mailbox) can open them.
            attachments: mail.attachments.map((a, i) => {
              const file = `${Date.now()}-${count}-${i}-${(a.filename ?? 'attachment').replace(/[^\w.-]+/g, '_')}`;
              writeFileSync(path.join(mailbox, file), a.content);
              return { filename: a.filename ?? null, contentType: a.contentType, size: a.size, file };
            }),
          };
          writeFileSync(path.join(mailbox, `${record.id}.json`), JSON.stringify(record, null, 2));
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve) => smtp.listen(0, '127.0.0.1', resolve));
  const smtpPort = (smtp.server.address() as AddressInfo).port;

  const s3 = new S3rver({ address: '127.0.0.1', port: 0, directory: objects, silent: true, configureBuckets: [{ name: bucket, configs: [] }] });
  const s3Address = (await s3.run()) as AddressInfo;

  return {
    env: {
      SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
      MAILBOX_DIR: mailbox,
      S3_ENDPOINT: `http://127.0.0.1:${s3Address.port}`,
      S3_BUCKET: bucket,
      S3_ACCESS_KEY_ID: 'S3RVER',
      S3_SECRET_ACCESS_KEY: 'S3RVER',
    },
    async stop() {
      await new Promise<void>((resolve) => smtp.close(() => resolve()));
      await s3.close();
    },
  };
}
