/** `npm run mail:list`: print the captured e-mails (newest last) with their links. */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { simpleParser } from 'mailparser';

async function main() {
  const dir = path.resolve(process.env.MAIL_DIR ?? '.data/mail');
  let files: string[] = [];
  try {
    files = readdirSync(dir).filter((f) => f.endsWith('.eml')).sort();
  } catch {
    console.log(`No mail captured yet (${dir} does not exist).`);
    return;
  }
  const last = files.slice(-Number(process.argv[2] ?? 10));
  for (const file of last) {
    const mail = await simpleParser(readFileSync(path.join(dir, file)));
    const to = Array.isArray(mail.to) ? mail.to.map((a) => a.text).join(', ') : mail.to?.text;
    const links = (mail.text ?? '').match(/https?:\/\/\S+/g) ?? [];
    console.log(`${file}\n  to: ${to}\n  subject: ${mail.subject}\n${links.map((l) => `  link: ${l}`).join('\n')}\n`);
  }
  if (last.length === 0) console.log('No mail captured yet.');
}

main();
