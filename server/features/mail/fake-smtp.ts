import { randomBytes } from 'node:crypto';
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { SMTPServer } from 'smtp-server';

export interface FakeSmtp {
  port: number;
  dir: string;
  close(): Promise<void>;
}

/**
 * A local mail server for development and tests: it takes every message and keeps it as an .eml
 * file in `dir` (nothing is delivered anywhere). Plain SMTP on 127.0.0.1, no sign-in, no TLS.
 */
export async function startFakeSmtp({ dir, port = 0, host = '127.0.0.1' }: { dir: string; port?: number; host?: string }): Promise<FakeSmtp> {
  mkdirSync(dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Railcall local mail catcher',
    size: 25 * 1024 * 1024,
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', callback);
      stream.on('end', () => {
        try {
          // Names sort by arrival; written whole, then renamed, so a reader never sees half a message.
          const name = `${Date.now().toString().padStart(15, '0')}-${randomBytes(4).toString('hex')}`;
          writeFileSync(join(dir, `${name}.tmp`), Buffer.concat(chunks));
          renameSync(join(dir, `${name}.tmp`), join(dir, `${name}.eml`));
          callback();
        } catch (error) {
          callback(error as Error);
        }
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  server.on('error', () => {});
  const address = (server as unknown as { server: { address(): AddressInfo } }).server.address();
  return {
    port: address.port,
    dir,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
