// The local mail fake: an SMTP server on 127.0.0.1 that keeps every message as an .eml file.
// Development and tests send through it; the outbox page and the tests read the files.
import { SMTPServer } from 'smtp-server';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const dir = process.env.MAIL_DIR ?? '.data/mail';
const port = Number(process.env.SMTP_PORT ?? 2525);
mkdirSync(dir, { recursive: true });
let seq = 0;

const server = new SMTPServer({
	authOptional: true,
	disabledCommands: ['STARTTLS', 'AUTH'],
	logger: false,
	size: 25 * 1024 * 1024,
	onData(stream, session, callback) {
		const chunks: Buffer[] = [];
		stream.on('data', (c: Buffer) => chunks.push(c));
		stream.on('end', () => {
			const name = `${Date.now()}-${process.pid}-${String(++seq).padStart(5, '0')}.eml`;
			writeFileSync(join(dir, name), Buffer.concat(chunks));
			callback();
		});
	}
});
server.on('error', (e) => console.error('mail fake:', e.message));
server.listen(port, '127.0.0.1', () => console.log(`mail fake listening on 127.0.0.1:${port}, saving to ${dir}`));
const stop = () => server.close(() => process.exit(0));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
