/**
 * The local fake mail server (development, demo and tests only): an SMTP server on
 * 127.0.0.1 (smtp-server) that accepts every message and saves it, exactly as received, as
 * an .eml file in the folder given. Nothing leaves the machine. Started and stopped by
 * scripts/lib/mail.ts, like the private MariaDB.
 *
 *   node scripts/fake-smtp.js --port 2525 --dir .data/mail
 *
 * A recipient whose address starts with `refuse` is refused for good (550), so the app's
 * handling of a permanent refusal can be seen and tested.
 */
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { SMTPServer } from 'smtp-server';

const arg = (name, fallback) => {
	const i = process.argv.indexOf(`--${name}`);
	return i > 0 ? process.argv[i + 1] : fallback;
};
const port = Number(arg('port', '2525'));
const dir = path.resolve(arg('dir', '.data/mail'));
mkdirSync(dir, { recursive: true });
let count = 0;

const server = new SMTPServer({
	name: 'fieldbench-fake-smtp',
	banner: 'Fieldbench local fake mail server: nothing leaves this machine',
	authOptional: true,
	disabledCommands: ['STARTTLS'],
	size: 25 * 1024 * 1024,
	logger: false,
	onRcptTo(address, _session, callback) {
		if (/^refuse/i.test(address.address)) {
			const err = Object.assign(new Error('Mailbox unavailable: this address refuses mail (fake server)'), { responseCode: 550 });
			return callback(err);
		}
		callback();
	},
	onData(stream, session, callback) {
		const chunks = [];
		stream.on('data', (c) => chunks.push(c));
		stream.on('end', () => {
			if (stream.sizeExceeded) return callback(Object.assign(new Error('Message too big'), { responseCode: 552 }));
			const stamp = new Date().toISOString().replace(/[:.]/g, '-');
			const name = `${stamp}-${process.pid}-${++count}.eml`;
			// Written under a temporary name first, so a reader never sees half a message.
			const tmp = path.join(dir, `.${name}.part`);
			writeFileSync(tmp, Buffer.concat(chunks));
			renameSync(tmp, path.join(dir, name));
			callback(null, `Saved as ${name}`);
		});
	}
});
server.on('error', (e) => console.error(`fake SMTP: ${e.message}`));
server.listen(port, '127.0.0.1', () => console.log(`fake SMTP listening on 127.0.0.1:${port}, saving to ${dir}`));
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => server.close(() => process.exit(0)));
