/**
 * The durable e-mail outbox (table `mail_outbox`, attempts in `mail_attempts`).
 *
 * A message is queued inside the transaction of the write that asks for it (so it exists
 * exactly when that write, and its audit row, committed). Workers in every app process then:
 *  1. claim due messages: `SELECT … FOR UPDATE SKIP LOCKED` picks rows no other process is
 *     claiming, and one UPDATE in the same transaction marks them `sending` with a lease
 *     (a random token and an end time) — so exactly one process holds a message at a time;
 *  2. send each one (see worker.ts), its Message-ID made from the idempotency key;
 *  3. finish it with an UPDATE fenced by the lease token: `sent`, or back to `queued` with the
 *     next try after a back-off, or `failed` with the server's reply (a permanent refusal,
 *     or the last attempt).
 * A process that dies mid-send leaves a `sending` row whose lease runs out; the next claim
 * takes it again and records the unfinished attempt as `interrupted`. Every attempt is a row
 * in `mail_attempts` with the server's reply.
 *
 * The report link travels in `link_secret` only until the message is sent or failed, then it
 * is cleared: afterwards the database holds only the hash of its token.
 */
import { QueryTypes, Transaction } from 'sequelize';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';
import { db } from '../db';
import { rawQuery } from '../db/raw';

/** How long a claim holds a message before another process may take it again. */
export const LEASE_MS = 120_000;
/** Where the report link goes in a stored message body (filled in just before sending). */
export const LINK_PLACEHOLDER = '{{report-link}}';

export type MailState = 'queued' | 'sending' | 'sent' | 'failed';

export type NewMail = {
	workshopId: string;
	reportId: string | null;
	idempotencyKey: string;
	to: string;
	subject: string;
	text: string;
	link: string | null;
	createdBy: string | null;
};

/** Queue a message inside the caller's transaction; an existing key is left as it is. */
export async function enqueueMail(t: Transaction, m: NewMail): Promise<string> {
	const id = uuidv7();
	await rawQuery(
		t,
		`INSERT IGNORE INTO mail_outbox (id, workshop_id, report_id, idempotency_key, message_id, to_address, subject, text_body,
		   link_secret, state, attempts, next_attempt_at, created_by, created_at, updated_at)
		 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, 'queued', 0, UTC_TIMESTAMP(3), ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
		[id, m.workshopId, m.reportId, m.idempotencyKey, messageIdOf(m.idempotencyKey), m.to, m.subject, m.text, m.link, m.createdBy]
	);
	return id;
}

/** The Message-ID of a message: the same for every attempt, so a receiver can tell a repeat. */
export function messageIdOf(key: string): string {
	return `<${key.replace(/[^A-Za-z0-9.-]/g, '.')}@fieldbench.mail>`;
}

export type Claimed = {
	id: string;
	leaseToken: string;
	attempt: number;
	reportId: string | null;
	idempotencyKey: string;
	messageId: string;
	to: string;
	subject: string;
	text: string;
	link: string | null;
};

/**
 * Claim up to `limit` due messages for `worker` (see step 1 above). READ COMMITTED, so the
 * scan takes no gap locks that would make claimers wait on each other; a deadlock all the
 * same claims nothing this round (the next round tries again).
 */
export async function claimDue(worker: string, limit = 5): Promise<Claimed[]> {
	try {
		return await claim(worker, limit);
	} catch (e) {
		if ((e as { errno?: number; parent?: { errno?: number } }).errno === 1213 || (e as { parent?: { errno?: number } }).parent?.errno === 1213) return [];
		throw e;
	}
}

async function claim(worker: string, limit: number): Promise<Claimed[]> {
	return db().transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }, async (t) => {
		const due = await rawQuery<{ id: string; state: MailState }[]>(
			t,
			`SELECT id, state FROM mail_outbox
			 WHERE (state = 'queued' AND next_attempt_at <= UTC_TIMESTAMP(3))
			    OR (state = 'sending' AND lease_until < UTC_TIMESTAMP(3))
			 ORDER BY next_attempt_at LIMIT ? FOR UPDATE SKIP LOCKED`,
			[limit]
		);
		if (!due.length) return [];
		const ids = due.map((d) => d.id);
		const stale = due.filter((d) => d.state === 'sending').map((d) => d.id);
		if (stale.length)
			await rawQuery(
				t,
				`UPDATE mail_attempts SET outcome = 'interrupted', finished_at = UTC_TIMESTAMP(3),
				   reply = 'The app stopped during this attempt; the message is tried again.'
				 WHERE outbox_id IN (?) AND outcome = 'sending'`,
				[stale]
			);
		const leaseToken = uuidv4();
		await rawQuery(
			t,
			`UPDATE mail_outbox SET state = 'sending', lease_token = ?, attempts = attempts + 1,
			   lease_until = UTC_TIMESTAMP(3) + INTERVAL ? SECOND, updated_at = UTC_TIMESTAMP(3)
			 WHERE id IN (?)`,
			[leaseToken, LEASE_MS / 1000, ids]
		);
		const rows = await rawQuery<Record<string, unknown>[]>(
			t,
			`SELECT id, attempts, report_id, idempotency_key, message_id, to_address, subject, text_body, link_secret
			 FROM mail_outbox WHERE id IN (?)`,
			[ids]
		);
		await rawQuery(
			t,
			`INSERT INTO mail_attempts (outbox_id, attempt, worker, outcome, started_at) VALUES ${rows.map(() => "(?, ?, ?, 'sending', UTC_TIMESTAMP(3))").join(', ')}`,
			rows.flatMap((r) => [r.id, r.attempts, worker])
		);
		return rows.map((r) => ({
			id: String(r.id),
			leaseToken,
			attempt: Number(r.attempts),
			reportId: (r.report_id as string | null) ?? null,
			idempotencyKey: String(r.idempotency_key),
			messageId: String(r.message_id),
			to: String(r.to_address),
			subject: String(r.subject),
			text: String(r.text_body),
			link: (r.link_secret as string | null) ?? null
		}));
	});
}

async function finishAttempt(t: Transaction, c: Claimed, outcome: 'sent' | 'retry' | 'failed', reply: string) {
	await rawQuery(
		t,
		`UPDATE mail_attempts SET outcome = ?, reply = ?, finished_at = UTC_TIMESTAMP(3)
		 WHERE outbox_id = ? AND attempt = ? AND outcome = 'sending'`,
		[outcome, reply.slice(0, 2000), c.id, c.attempt]
	);
}

/** Mark a claimed message sent; false when the lease was lost (another process took it). */
export async function markSent(c: Claimed, reply: string): Promise<boolean> {
	return db().transaction(async (t) => {
		const r = await rawQuery<{ affectedRows: number }>(
			t,
			`UPDATE mail_outbox SET state = 'sent', sent_at = UTC_TIMESTAMP(3), last_reply = ?, link_secret = NULL,
			   lease_token = NULL, lease_until = NULL, updated_at = UTC_TIMESTAMP(3)
			 WHERE id = ? AND lease_token = ?`,
			[reply.slice(0, 2000), c.id, c.leaseToken]
		);
		await finishAttempt(t, c, 'sent', reply);
		return r.affectedRows === 1;
	});
}

/**
 * Record a failed attempt: `failed` for good when `permanent` or out of attempts, otherwise
 * `queued` again after `retryInMs`. Returns the state it is left in.
 */
export async function markFailed(
	c: Claimed,
	reply: string,
	o: { permanent: boolean; maxAttempts: number; retryInMs: number }
): Promise<MailState> {
	const final = o.permanent || c.attempt >= o.maxAttempts;
	return db().transaction(async (t) => {
		await rawQuery(
			t,
			final
				? `UPDATE mail_outbox SET state = 'failed', last_reply = ?, link_secret = NULL, lease_token = NULL,
				     lease_until = NULL, updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND lease_token = ?`
				: `UPDATE mail_outbox SET state = 'queued', last_reply = ?, lease_token = NULL, lease_until = NULL,
				     next_attempt_at = UTC_TIMESTAMP(3) + INTERVAL ? MICROSECOND, updated_at = UTC_TIMESTAMP(3)
				   WHERE id = ? AND lease_token = ?`,
			final ? [reply.slice(0, 2000), c.id, c.leaseToken] : [reply.slice(0, 2000), o.retryInMs * 1000, c.id, c.leaseToken]
		);
		await finishAttempt(t, c, final ? 'failed' : 'retry', reply);
		return final ? 'failed' : 'queued';
	});
}

/** Stop a message that has not left yet (its report was withdrawn); false if it is under way or gone. */
export async function cancelQueued(t: Transaction, reportId: string, reason: string): Promise<boolean> {
	const r = await rawQuery<{ affectedRows: number }>(
		t,
		`UPDATE mail_outbox SET state = 'failed', last_reply = ?, link_secret = NULL, updated_at = UTC_TIMESTAMP(3)
		 WHERE report_id = ? AND state = 'queued'`,
		[reason, reportId]
	);
	return r.affectedRows > 0;
}

export type MailStatus = {
	state: MailState;
	attempts: number;
	lastReply: string | null;
	sentAt: Date | null;
	nextAttemptAt: Date | null;
};

/** The outbox state of each report's message, by report id. */
export async function mailStatusOfReports(reportIds: string[]): Promise<Map<string, MailStatus>> {
	if (!reportIds.length) return new Map();
	const rows = await db().query<Record<string, unknown>>(
		`SELECT report_id, state, attempts, last_reply, sent_at, next_attempt_at FROM mail_outbox WHERE report_id IN (?)`,
		{ replacements: [reportIds], type: QueryTypes.SELECT }
	);
	return new Map(
		rows.map((r) => [
			String(r.report_id),
			{
				state: r.state as MailState,
				attempts: Number(r.attempts),
				lastReply: (r.last_reply as string | null) ?? null,
				sentAt: (r.sent_at as Date | null) ?? null,
				nextAttemptAt: (r.next_attempt_at as Date | null) ?? null
			}
		])
	);
}
