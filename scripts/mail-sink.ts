/**
 * Local SMTP sink for development and tests: accepts every message on loopback and writes it,
 * unchanged, as an .eml file into MAIL_DIR. Nothing leaves the machine. The messages hold
 * invitation and password-reset links: the folder and files are readable by their owner only.
 */
import { chmodSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { SMTPServer } from 'smtp-server';

const port = Number(process.env.SMTP_PORT ?? 2525);
const dir = path.resolve(process.env.MAIL_DIR ?? '.data/mail');
mkdirSync(dir, { recursive: true, mode: 0o700 });
chmodSync(dir, 0o700);

let counter = 0;
const server = new SMTPServer({
  // The package's bundled certificate has expired; loopback only, so plain SMTP.
  disabledCommands: ['STARTTLS'],
  authOptional: true,
  logger: false,
  onData(stream, _session, callback) {
    const chunks: Buffer[] = [];
    stream.on('data', (chunk: Buffer) => chunks.push(chunk));
    stream.on('end', () => {
      counter += 1;
      const name = `${Date.now()}-${process.pid}-${String(counter).padStart(5, '0')}.eml`;
      writeFileSync(path.join(dir, name), Buffer.concat(chunks), { mode: 0o600 });
      callback();
    });
  },
});

server.listen(port, '127.0.0.1', () => {
  console.log(`mail sink listening on 127.0.0.1:${port}, writing to ${dir}`);
});

for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => server.close(() => process.exit(0)));
}
