/**
 * The e-mail worker that runs in every app process: every MAIL_POLL_MS (and right after a
 * message is queued in this process) it claims due messages from the outbox (outbox.ts) and
 * sends them with nodemailer over SMTP, with the report's PDF attached and the link filled
 * in. A 5xx reply is a permanent refusal (`failed` at once); anything else (the server down,
 * a 4xx, a time-out) is tried again after a back-off, up to MAIL_MAX_ATTEMPTS.
 *
 * Without SMTP_HOST the worker does not start: messages stay queued until a server is set.
 */
import os from 'node:os';
import nodemailer from 'nodemailer';
import { QueryTypes } from 'sequelize';
import { db } from '../db';
import { mailConfig, retryDelay, type MailConfig } from './config';
import { claimDue, LINK_PLACEHOLDER, markFailed, markSent, type Claimed } from './outbox';

type Transport = ReturnType<typeof nodemailer.createTransport>;

const WORKER = `${os.hostname()}:${process.pid}`;
let config: MailConfig | null = null;
let transport: Transport | null = null;
let timer: NodeJS.Timeout | null = null;
let running: Promise<void> | null = null;
let again = false;
let stopped = true;
let lastError = '';

/** The PDF of a report and the name it is attached under. */
async function attachmentOf(reportId: string | null) {
	if (!reportId) return [];
	const [row] = await db().query<{ pdf: Buffer; number: number }>(
		`SELECT r.pdf, j.number FROM reports r JOIN jobs j ON j.id = r.job_id WHERE r.id = ?`,
		{ replacements: [reportId], type: QueryTypes.SELECT }
	);
	if (!row) return [];
	return [{ filename: `Vehicle report, job ${row.number}.pdf`, content: Buffer.from(row.pdf), contentType: 'application/pdf' }];
}

/** The server's words for a failure, as kept in the attempt's row. */
function replyOf(e: unknown): { text: string; permanent: boolean } {
	const err = e as { responseCode?: number; response?: string; code?: string; message?: string };
	const permanent = typeof err.responseCode === 'number' && err.responseCode >= 500;
	const text = err.response ?? [err.code, err.message].filter(Boolean).join(': ') ?? String(e);
	return { text: text || 'No answer from the mail server', permanent };
}

async function sendOne(c: Claimed, cfg: MailConfig, t: Transport) {
	try {
		const info = await t.sendMail({
			from: cfg.from,
			to: c.to,
			subject: c.subject,
			text: c.link ? c.text.replaceAll(LINK_PLACEHOLDER, c.link) : c.text,
			messageId: c.messageId,
			headers: { 'X-Fieldbench-Key': c.idempotencyKey },
			attachments: await attachmentOf(c.reportId)
		});
		await markSent(c, String(info.response ?? '250 accepted'));
	} catch (e) {
		const r = replyOf(e);
		await markFailed(c, r.text, {
			permanent: r.permanent,
			maxAttempts: cfg.maxAttempts,
			retryInMs: retryDelay(c.attempt, cfg.retryBaseMs)
		});
	}
}

/** One round: claim what is due and send it, until nothing is due. */
export async function runMailOnce(cfg: MailConfig = config ?? mailConfig()): Promise<number> {
	if (!cfg.smtp) return 0;
	transport ??= nodemailer.createTransport({
		...cfg.smtp,
		connectionTimeout: 10_000,
		greetingTimeout: 10_000,
		socketTimeout: 30_000
	});
	let sent = 0;
	for (let round = 0; round < 20; round++) {
		const claims = await claimDue(WORKER);
		if (!claims.length) break;
		for (const c of claims) {
			await sendOne(c, cfg, transport);
			sent++;
		}
	}
	return sent;
}

function schedule(ms: number) {
	if (stopped) return;
	if (timer) clearTimeout(timer);
	timer = setTimeout(tick, ms);
	timer.unref();
}

function tick() {
	timer = null;
	if (running || stopped) {
		again = true;
		return;
	}
	running = runMailOnce()
		.then(() => {
			lastError = '';
		})
		.catch((e) => {
			// The database may be away for a moment (a restart, a migration): say so once.
			const text = String((e as Error)?.message ?? e);
			if (text !== lastError) console.error(`Mail worker: ${text}`);
			lastError = text;
		})
		.finally(() => {
			running = null;
			schedule(again ? 0 : (config?.pollMs ?? 5000));
			again = false;
		});
}

/** Start the worker of this process (no-op without SMTP_HOST). */
export function startMailWorker(): boolean {
	config = mailConfig();
	if (!config.smtp || !stopped) return false;
	stopped = false;
	schedule(Math.min(config.pollMs, 1000));
	return true;
}

/** Look at the outbox now (a message was just queued in this process). */
export function kickMailWorker(): void {
	if (stopped) return;
	if (running) again = true;
	else schedule(0);
}

/** Stop the worker; resolves when a round under way has finished. */
export async function stopMailWorker(): Promise<void> {
	stopped = true;
	if (timer) clearTimeout(timer);
	timer = null;
	await running;
	transport?.close();
	transport = null;
}
