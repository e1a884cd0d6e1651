/**
 * Customer reports: preview, send, withdraw, the job's list of reports sent, and opening a
 * report by its link. Sending, in order:
 *  1. parse the form (400 naming the field) → the job in the actor's workshop (404) → the
 *     rule `maySendReport` (403);
 *  2. gather the job's facts and word them (`buildReport`); when they differ from what the
 *     sender previewed (the digest), answer 409 with the new preview;
 *  3. by e-mail only with the customer's address and report consent (400 otherwise — the
 *     link can still be handed over);
 *  4. draw the PDF; then in ONE transaction: the report row (its words and the exact PDF
 *     frozen, the link token's hash, the expiry), the audit row, and — for e-mail — the
 *     outbox message. A form sent twice (same `sendKey`) makes one report.
 * The report is not part of the phones' sync, so it writes no change-feed row.
 */
import { createHash } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { z } from 'zod';
import { reportNotes, sendReport as sendSchema, type ReportNotes } from '../../schemas/report';
import { emailSubject, emailText } from '../../report/email';
import type { Paper, ReportDoc, SentReport } from '../../report/types';
export type { SentReport };
import { buildReport } from '../../report/words';
import { longDayIn } from '../../zoned-time';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { AppError, ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { cancelQueued, enqueueMail, LINK_PLACEHOLDER, mailStatusOfReports } from '../mail/outbox';
import { kickMailWorker } from '../mail/worker';
import { gatherFacts, jobWithParties, type JobParties } from './facts';
import { printPhotoLoader, renderReportPdf } from './pdf';
import { printPhoto } from '../photos/service';
import { maySendReport, mayWithdrawReport } from './rules';
import { readReportSettings, type ReportSettings } from './settings';
import { hashReportToken, looksLikeToken, newReportToken } from './token';

const DAY_MS = 86_400_000;
const isId = (s: string) => z.uuid().safeParse(s).success;

function parse<T>(schema: { safeParse: (v: unknown) => { success: boolean; data?: T; error?: unknown } }, input: unknown): T {
	const r = schema.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error as never);
	return r.data as T;
}

/** A digest of the report's words (the day left out, so a preview stays valid past midnight). */
export function digestOf(doc: ReportDoc): string {
	const { date: _d, dateText: _t, ...rest } = doc;
	return createHash('sha256').update(JSON.stringify(rest)).digest('hex');
}

/** Whether the customer can be sent the report by e-mail, and if not, why (in words). */
export function emailBlock(c: JobParties['customer']): string | null {
	if (!c) return 'This job has no customer, so there is no one to e-mail.';
	if (!c.email) return `${c.name} has no e-mail address on file.`;
	if (!c.reportConsent)
		return `${c.name} has not agreed to receive reports by e-mail. Hand over the link instead, or record their consent on the customer’s page first.`;
	return null;
}

type Loaded = JobParties & { settings: ReportSettings };

async function load(actor: Actor, jobId: string): Promise<Loaded> {
	const p = await jobWithParties(actor, jobId);
	const settings = await readReportSettings(actor.workshopId);
	if (!maySendReport(actor, p.job, settings))
		throw new ForbiddenError(
			actor.role === 'technician'
				? 'Your workshop lets only its leads send reports, or this job is not assigned to you'
				: 'Only a workshop lead sends reports to customers'
		);
	return { ...p, settings };
}

export type Preview = {
	doc: ReportDoc;
	/** Tests by apprentices left out until a lead signs them off. */
	awaitingSignOff: number;
	digest: string;
	customer: { name: string; email: string | null; consent: boolean } | null;
	emailBlock: string | null;
	paper: Paper;
	linkDays: number;
};

/** The report as it would go now, with the sender's notes (403 when they may not send). */
export async function previewReport(actor: Actor, jobId: string, notes: unknown = {}): Promise<Preview> {
	const l = await load(actor, jobId);
	const n = parse<ReportNotes>(reportNotes, notes);
	const { facts, awaitingSignOff } = await gatherFacts(actor, l, l.settings, n);
	const doc = buildReport(facts);
	return {
		doc,
		awaitingSignOff,
		digest: digestOf(doc),
		customer: l.customer ? { name: l.customer.name, email: l.customer.email, consent: Boolean(l.customer.reportConsent) } : null,
		emailBlock: emailBlock(l.customer),
		paper: l.settings.paper,
		linkDays: l.settings.linkDays
	};
}

/** 409 when the job's report changed since the sender's preview; carries the new one. */
export class ReportChangedError extends AppError {
	constructor(readonly preview: Preview) {
		super(409, 'report_changed', 'The job changed since your preview. Look at the report again, then send it.');
	}
}

export type Sent = {
	reportId: string;
	/** The link, shown once (null when the same form was sent before). */
	link: string | null;
	channel: 'email' | 'link';
	recipient: string | null;
	expiresAt: Date;
};

/** Send the report (steps 1–4 above). `baseUrl` is where links open. */
export async function sendReport(actor: Actor, jobId: string, input: unknown, baseUrl: string): Promise<Sent> {
	const l = await load(actor, jobId);
	const s = parse<ReturnType<typeof sendSchema.parse>>(sendSchema, input);
	const previous = await findBySendKey(actor, s.sendKey);
	if (previous) return previous;
	const doc = buildReport((await gatherFacts(actor, l, l.settings, s)).facts);
	const digest = digestOf(doc);
	if (digest !== s.digest) throw new ReportChangedError({ ...(await previewReport(actor, jobId, s)) });
	if (s.channel === 'email') {
		const why = emailBlock(l.customer);
		if (why) throw new AppError(400, 'no_consent', why, { fields: { channel: why } });
	}
	const pdf = await renderReportPdf(doc, { paper: s.paper, loadPhoto: printPhotoLoader(actor.workshopId, printPhoto) });
	const token = newReportToken();
	const link = `${baseUrl.replace(/\/$/, '')}/r/${token}`;
	const id = uuidv7();
	const expiresAt = new Date(Date.now() + l.settings.linkDays * DAY_MS);
	const recipient = s.channel === 'email' ? l.customer!.email! : null;
	await db().transaction(async (t) => {
		await db().query(
			`INSERT INTO reports (id, workshop_id, job_id, send_key, token_hash, channel, recipient, paper, content, pdf, pdf_sha256,
			   expires_at, created_by, created_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
			{
				replacements: [
					id, actor.workshopId, jobId, s.sendKey, hashReportToken(token), s.channel, recipient, s.paper,
					JSON.stringify(doc), pdf, createHash('sha256').update(pdf).digest('hex'), expiresAt, actor.userId
				],
				type: QueryTypes.INSERT,
				transaction: t
			}
		);
		await writeAudit(t, actor, 'report', id, 'send', [
			{ field: 'jobId', old: null, new: jobId },
			{ field: 'channel', old: null, new: s.channel },
			{ field: 'recipient', old: null, new: recipient },
			{ field: 'expiresAt', old: null, new: expiresAt }
		], null);
		if (recipient)
			await enqueueMail(t, {
				workshopId: actor.workshopId,
				reportId: id,
				idempotencyKey: `report-${id}`,
				to: recipient,
				subject: emailSubject(doc),
				text: emailText(doc, LINK_PLACEHOLDER, longDayIn(expiresAt, l.settings.timeZone)),
				link,
				createdBy: actor.userId
			});
	});
	if (recipient) kickMailWorker();
	return { reportId: id, link, channel: s.channel, recipient, expiresAt };
}

async function findBySendKey(actor: Actor, sendKey: string): Promise<Sent | null> {
	const [r] = await db().query<Record<string, unknown>>(
		`SELECT id, channel, recipient, expires_at FROM reports WHERE workshop_id = ? AND send_key = ?`,
		{ replacements: [actor.workshopId, sendKey], type: QueryTypes.SELECT }
	);
	return r
		? { reportId: String(r.id), link: null, channel: r.channel as 'email' | 'link', recipient: (r.recipient as string | null) ?? null, expiresAt: r.expires_at as Date }
		: null;
}

/** Withdraw a report's link (leads and owners); an e-mail not yet sent is stopped too. */
export async function withdrawReport(actor: Actor, jobId: string, reportId: string): Promise<void> {
	if (!mayWithdrawReport(actor)) throw new ForbiddenError('Only a workshop lead withdraws a report');
	if (!isId(reportId)) throw new NotFoundError('Report');
	await db().transaction(async (t) => {
		const [r] = await db().query<{ withdrawn_at: Date | null }>(
			'SELECT withdrawn_at FROM reports WHERE id = ? AND workshop_id = ? AND job_id = ? FOR UPDATE',
			{ replacements: [reportId, actor.workshopId, jobId], type: QueryTypes.SELECT, transaction: t }
		);
		if (!r) throw new NotFoundError('Report');
		if (r.withdrawn_at) return;
		await db().query('UPDATE reports SET withdrawn_at = UTC_TIMESTAMP(3), withdrawn_by = ? WHERE id = ?', {
			replacements: [actor.userId, reportId],
			type: QueryTypes.UPDATE,
			transaction: t
		});
		await cancelQueued(t, reportId, 'Not sent: the report was withdrawn before it left.');
		await writeAudit(t, actor, 'report', reportId, 'withdraw', [{ field: 'withdrawnAt', old: null, new: new Date() }], null);
	});
}

/** The reports sent on a job, newest first, with their e-mail's state (anyone who may open the job). */
export async function reportsOfJob(actor: Actor, jobId: string): Promise<SentReport[]> {
	const rows = await db().query<Record<string, unknown>>(
		`SELECT r.id, r.channel, r.recipient, r.paper, r.created_at, r.expires_at, r.withdrawn_at, LENGTH(r.pdf) AS bytes,
		   u.name AS by_name, w.name AS withdrawn_name
		 FROM reports r LEFT JOIN users u ON u.id = r.created_by LEFT JOIN users w ON w.id = r.withdrawn_by
		 WHERE r.workshop_id = ? AND r.job_id = ? ORDER BY r.created_at DESC, r.id DESC`,
		{ replacements: [actor.workshopId, jobId], type: QueryTypes.SELECT }
	);
	const ids = rows.map((r) => String(r.id));
	const mail = await mailStatusOfReports(ids);
	const attempts = ids.length
		? await db().query<Record<string, unknown>>(
				`SELECT o.report_id, a.attempt, a.outcome, a.reply, a.started_at FROM mail_attempts a
				 JOIN mail_outbox o ON o.id = a.outbox_id WHERE o.report_id IN (?) ORDER BY a.id`,
				{ replacements: [ids], type: QueryTypes.SELECT }
			)
		: [];
	return rows.map((r) => ({
		id: String(r.id),
		channel: r.channel as 'email' | 'link',
		recipient: (r.recipient as string | null) ?? null,
		paper: r.paper as Paper,
		createdAt: r.created_at as Date,
		by: (r.by_name as string | null) ?? 'A former colleague',
		expiresAt: r.expires_at as Date,
		withdrawnAt: (r.withdrawn_at as Date | null) ?? null,
		withdrawnBy: (r.withdrawn_name as string | null) ?? null,
		pdfBytes: Number(r.bytes),
		mail: mail.get(String(r.id)) ?? null,
		attempts: attempts
			.filter((a) => a.report_id === r.id)
			.map((a) => ({ attempt: Number(a.attempt), outcome: String(a.outcome), reply: (a.reply as string | null) ?? null, at: a.started_at as Date }))
	}));
}

/** The exact PDF that went out with a report of the job. */
export async function keptPdf(actor: Actor, jobId: string, reportId: string): Promise<{ pdf: Buffer; jobNumber: number }> {
	if (!isId(reportId) || !isId(jobId)) throw new NotFoundError('Report');
	const [r] = await db().query<{ pdf: Buffer; number: number }>(
		`SELECT r.pdf, j.number FROM reports r JOIN jobs j ON j.id = r.job_id WHERE r.id = ? AND r.job_id = ? AND r.workshop_id = ?`,
		{ replacements: [reportId, jobId, actor.workshopId], type: QueryTypes.SELECT }
	);
	if (!r) throw new NotFoundError('Report');
	return { pdf: Buffer.from(r.pdf), jobNumber: Number(r.number) };
}

export type Opened =
	| { state: 'open'; id: string; workshopId: string; doc: ReportDoc; paper: Paper; pdf: Buffer; expiresAt: Date }
	| { state: 'expired' | 'withdrawn'; workshopName: string }
	| { state: 'unknown' };

/** A report by its link token (no sign-in: the token is the key). */
export async function openReport(token: string, now = new Date()): Promise<Opened> {
	if (!looksLikeToken(token)) return { state: 'unknown' };
	const [r] = await db().query<Record<string, unknown>>(
		`SELECT r.id, r.workshop_id, r.content, r.paper, r.pdf, r.expires_at, r.withdrawn_at, w.name AS workshop
		 FROM reports r JOIN workshops w ON w.id = r.workshop_id WHERE r.token_hash = ?`,
		{ replacements: [hashReportToken(token)], type: QueryTypes.SELECT }
	);
	if (!r) return { state: 'unknown' };
	if (r.withdrawn_at) return { state: 'withdrawn', workshopName: String(r.workshop) };
	if ((r.expires_at as Date).getTime() <= now.getTime()) return { state: 'expired', workshopName: String(r.workshop) };
	return {
		state: 'open',
		id: String(r.id),
		workshopId: String(r.workshop_id),
		doc: JSON.parse(String(r.content)) as ReportDoc,
		paper: r.paper as Paper,
		pdf: Buffer.from(r.pdf as Buffer),
		expiresAt: r.expires_at as Date
	};
}

