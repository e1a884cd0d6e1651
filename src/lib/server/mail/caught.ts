/**
 * The messages the local fake mail server caught (scripts/fake-smtp.js saves each as an .eml
 * file in SMTP_FAKE_DIR), read back with mailparser for the demo page. Only when the fake is
 * in use; a real mail server's messages are never read here.
 */
import { readdir, readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import { mailConfig } from './config';

const FILE = /^[\w.-]+\.eml$/;

/** The fake's folder, or null when the app sends through a real mail server. */
export const caughtDir = () => mailConfig().fakeDir;

export type CaughtSummary = { file: string; to: string; subject: string; date: Date | null; attachments: number };

/** The newest `limit` caught messages. */
export async function listCaught(limit = 50): Promise<CaughtSummary[]> {
	const dir = caughtDir();
	if (!dir) return [];
	const names = (await readdir(dir).catch(() => [] as string[])).filter((f) => FILE.test(f));
	const withTimes = await Promise.all(names.map(async (f) => ({ f, t: (await stat(path.join(dir, f))).mtimeMs })));
	const newest = withTimes.sort((a, b) => b.t - a.t || b.f.localeCompare(a.f)).slice(0, limit);
	return Promise.all(
		newest.map(async ({ f }) => {
			const m = await simpleParser(await readFile(path.join(dir, f)));
			return {
				file: f,
				to: m.to ? (Array.isArray(m.to) ? m.to.map((x) => x.text).join(', ') : m.to.text) : '',
				subject: m.subject ?? '(no subject)',
				date: m.date ?? null,
				attachments: m.attachments.length
			};
		})
	);
}

/** One caught message, parsed; null when there is no such file. */
export async function readCaught(file: string) {
	const dir = caughtDir();
	if (!dir || !FILE.test(file)) return null;
	const raw = await readFile(path.join(dir, file)).catch(() => null);
	if (!raw) return null;
	const m = await simpleParser(raw);
	return {
		file,
		from: m.from?.text ?? '',
		to: m.to ? (Array.isArray(m.to) ? m.to.map((x) => x.text).join(', ') : m.to.text) : '',
		subject: m.subject ?? '(no subject)',
		date: m.date ?? null,
		messageId: m.messageId ?? null,
		text: m.text ?? '',
		attachments: m.attachments.map((a) => ({ filename: a.filename ?? 'attachment', contentType: a.contentType, size: a.size, content: a.content }))
	};
}
