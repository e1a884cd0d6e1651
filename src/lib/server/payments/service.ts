/**
 * Payments on a job: asked by card through the provider (`provider.ts`), or recorded by hand
 * (cash, bank transfer); refunds by leads and owners. The amount and currency always come
 * from the server — the approved quote's total, or the workshop's diagnostic fee with tax —
 * never from a client.
 *
 * The provider's webhook (`applyWebhook`) is the only thing that marks a card payment paid
 * or failed: its signature is checked, each event is applied once (its id is the key of
 * `payment_events`), and events may arrive in any order — a payment's state only moves
 * forward (pending → failed/expired → paid → refunded), so a late "failed" never undoes
 * "paid", and a "paid" whose amount or currency differs from ours is not taken. Every change
 * is an audit row (`payment`), with who (a person, or the provider) and when.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { z } from 'zod';
import { formatMoney, parseAmount, quoteTotals, sum, toDecimal, type Currency } from '../../money';
import { pageParam, pageSizeParam, sortParam } from '../../schemas/common';
import { inOrder, orderBy, pageOfIds, Where } from '../services/list-sql';
import { isLead } from '../../roles';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { Job, Quote, User } from '../db/models';
import { AppError, ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { readPricing } from '../quotes/pricing';
import { refuseRefund, seesJob } from '../services/rules';
import { BadSignatureError, paymentsConfigured, provider, type PayEvent } from './provider';

export type PaymentState = 'pending' | 'paid' | 'failed' | 'refunded' | 'expired';
export type Purpose = 'quote' | 'diagnostic';
export type Method = 'card' | 'cash' | 'transfer';

const RANK: Record<PaymentState, number> = { pending: 0, failed: 1, expired: 1, paid: 2, refunded: 3 };

export const PAYMENT_STATE_LABELS: Record<PaymentState, string> = {
	pending: 'Waiting for the customer',
	paid: 'Paid',
	failed: 'Card declined',
	refunded: 'Refunded',
	expired: 'Payment page closed unpaid'
};
export const METHOD_LABELS: Record<Method, string> = { card: 'Card', cash: 'Cash', transfer: 'Bank transfer' };
export const PURPOSE_LABELS: Record<Purpose, string> = { quote: 'Quote', diagnostic: 'Diagnostic fee' };

/** The provider, written into the audit rows of what its webhooks change. */
const providerActor = (workshopId: string): Actor => ({
	userId: null as unknown as string,
	workshopId,
	role: 'owner',
	deviceId: 'payment-provider'
});

export class PaymentsOffError extends AppError {
	constructor() {
		super(503, 'payments_off', 'Card payments are not set up for this workshop. Record cash or a bank transfer instead.');
	}
}

type Due = { amountMinor: number; currency: Currency; quoteId: string | null; description: string };

/** What is due for a purpose, from the server's own figures (400 when nothing is). */
export async function amountDue(workshopId: string, job: Job, purpose: Purpose, t?: Transaction): Promise<Due> {
	if (purpose === 'quote') {
		const q = await Quote.findOne({
			where: { workshopId, jobId: job.id, state: 'approved', deletedAt: null },
			order: [['answeredAt', 'DESC']],
			transaction: t
		});
		if (!q || !q.totalMinor || !q.currency) throw new ValidationError({ purpose: 'The customer has not approved a quote on this job' });
		return { amountMinor: q.totalMinor, currency: q.currency as Currency, quoteId: q.id, description: `Job ${job.number}: approved quote` };
	}
	const p = await readPricing(workshopId, t);
	if (!p || !p.diagnosticFeeMinor) throw new ValidationError({ purpose: 'The workshop has not set a diagnostic fee' });
	const totals = quoteTotals([{ kind: 'diagnostic', text: 'Diagnosis', unitMinor: p.diagnosticFeeMinor, quantityMilli: 1000 }], p.taxRateBp);
	return { amountMinor: totals.totalMinor, currency: p.currency, quoteId: null, description: `Job ${job.number}: diagnostic fee` };
}

async function jobFor(actor: Actor, jobId: string, t?: Transaction) {
	if (!z.uuid().safeParse(jobId).success) throw new NotFoundError('Job');
	const job = await Job.findOne({ where: { id: jobId, workshopId: actor.workshopId, deletedAt: null }, transaction: t });
	if (!job || !seesJob(actor, job)) throw new NotFoundError('Job');
	return job;
}

const purposeSchema = z.enum(['quote', 'diagnostic'], { error: 'Choose what the payment is for' });

async function insertPayment(
	t: Transaction,
	actor: Actor,
	row: { id: string; jobId: string; quoteId: string | null; purpose: Purpose; method: Method; amountMinor: number; currency: string; state: PaymentState; note?: string | null }
) {
	await db().query(
		`INSERT INTO payments (id, workshop_id, job_id, quote_id, purpose, method, amount_minor, currency, state, note, created_by, created_at, paid_at, updated_at)
		 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3), ${row.state === 'paid' ? 'UTC_TIMESTAMP(3)' : 'NULL'}, UTC_TIMESTAMP(3))`,
		{
			replacements: [row.id, actor.workshopId, row.jobId, row.quoteId, row.purpose, row.method, row.amountMinor, row.currency, row.state, row.note ?? null, actor.userId],
			transaction: t,
			type: QueryTypes.INSERT
		}
	);
	await writeAudit(t, actor, 'payment', row.id, 'create', [
		{ field: 'state', old: null, new: row.state },
		{ field: 'amountMinor', old: null, new: row.amountMinor },
		{ field: 'method', old: null, new: row.method }
	], null);
}

/**
 * Ask for a card payment: a payment row (pending) and the provider's hosted page for the
 * amount due. Anyone who may work on the job may ask; the customer pays on the provider's page.
 */
export async function askCardPayment(actor: Actor, jobId: string, purposeInput: unknown, urls: { successUrl: string; cancelUrl: string }) {
	if (!paymentsConfigured()) throw new PaymentsOffError();
	const parsed = purposeSchema.safeParse(purposeInput);
	if (!parsed.success) throw new ValidationError({ purpose: 'Choose what the payment is for' });
	const purpose = parsed.data as Purpose;
	const job = await jobFor(actor, jobId);
	const due = await amountDue(actor.workshopId, job, purpose);
	const id = uuidv7();
	await db().transaction((t) => insertPayment(t, actor, { id, jobId, quoteId: due.quoteId, purpose, method: 'card', amountMinor: due.amountMinor, currency: due.currency, state: 'pending' }));
	const made = await provider().createCheckout({
		paymentId: id,
		workshopId: actor.workshopId,
		amountMinor: due.amountMinor,
		currency: due.currency,
		description: `${due.description} — ${formatMoney(due.amountMinor, due.currency)}`,
		successUrl: urls.successUrl,
		cancelUrl: urls.cancelUrl
	});
	await db().query('UPDATE payments SET provider_session = ?, provider_payment = ?, pay_url = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?', {
		replacements: [made.sessionId, made.paymentRef, made.url, id],
		type: QueryTypes.UPDATE
	});
	return { paymentId: id, url: made.url, amountMinor: due.amountMinor, currency: due.currency };
}

/** The customer's own "pay now" from their quote link: the approved quote's total, by card. */
export async function askCardPaymentForQuote(workshopId: string, quoteId: string, urls: { successUrl: string; cancelUrl: string }) {
	const q = await Quote.findOne({ where: { id: quoteId, workshopId, state: 'approved' } });
	if (!q) throw new NotFoundError('Quote');
	// An open or paid card payment of this quote is reused, never asked twice.
	const [open] = await db().query<{ id: string; state: string; pay_url: string | null }>(
		`SELECT id, state, pay_url FROM payments WHERE workshop_id = ? AND quote_id = ? AND method = 'card' AND state IN ('pending', 'paid') ORDER BY created_at DESC LIMIT 1`,
		{ replacements: [workshopId, quoteId], type: QueryTypes.SELECT }
	);
	if (open?.state === 'paid') return { paid: true as const };
	if (open?.pay_url) return { paid: false as const, url: open.pay_url };
	const actor = { ...providerActor(workshopId), deviceId: 'customer-link' };
	const made = await askCardPayment(actor, q.jobId, 'quote', urls);
	return { paid: false as const, url: made.url };
}

const manualInput = z.object({
	purpose: purposeSchema,
	method: z.enum(['cash', 'transfer'], { error: 'Cash or bank transfer' }),
	note: z.string().trim().max(300, 'At most 300 characters').optional().default('')
});

/** Record a cash or bank transfer payment taken by hand, for the amount due. */
export async function recordManualPayment(actor: Actor, jobId: string, input: unknown) {
	const r = manualInput.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	return db().transaction(async (t) => {
		const job = await jobFor(actor, jobId, t);
		const due = await amountDue(actor.workshopId, job, r.data.purpose as Purpose, t);
		const id = uuidv7();
		await insertPayment(t, actor, { id, jobId, quoteId: due.quoteId, purpose: r.data.purpose as Purpose, method: r.data.method, amountMinor: due.amountMinor, currency: due.currency, state: 'paid', note: r.data.note || null });
		return { paymentId: id, amountMinor: due.amountMinor, currency: due.currency };
	});
}

type PaymentRow = {
	id: string;
	workshop_id: string;
	job_id: string;
	method: Method;
	state: PaymentState;
	amount_minor: number | string;
	refunded_minor: number | string;
	currency: string;
	provider_session: string | null;
	provider_payment: string | null;
};

async function lockPayment(t: Transaction, where: string, args: unknown[]): Promise<PaymentRow | null> {
	const [row] = await db().query<PaymentRow>(
		`SELECT id, workshop_id, job_id, method, state, amount_minor, refunded_minor, currency, provider_session, provider_payment FROM payments WHERE ${where} LIMIT 1 FOR UPDATE`,
		{ replacements: args, type: QueryTypes.SELECT, transaction: t }
	);
	return row ?? null;
}

async function moveState(t: Transaction, actor: Actor, p: PaymentRow, to: PaymentState, extra: { failure?: string | null; refundedMinor?: number; paymentRef?: string | null } = {}) {
	await db().query(
		`UPDATE payments SET state = ?, version = version + 1, updated_at = UTC_TIMESTAMP(3)
		   ${to === 'paid' ? ', paid_at = COALESCE(paid_at, UTC_TIMESTAMP(3))' : ''}
		   ${extra.failure !== undefined ? ', failure = ?' : ''}
		   ${extra.refundedMinor !== undefined ? ', refunded_minor = ?' : ''}
		   ${extra.paymentRef ? ', provider_payment = COALESCE(provider_payment, ?)' : ''}
		 WHERE id = ?`,
		{
			replacements: [
				to,
				...(extra.failure !== undefined ? [extra.failure] : []),
				...(extra.refundedMinor !== undefined ? [extra.refundedMinor] : []),
				...(extra.paymentRef ? [extra.paymentRef] : []),
				p.id
			],
			transaction: t,
			type: QueryTypes.UPDATE
		}
	);
	await writeAudit(t, actor, 'payment', p.id, 'update', [{ field: 'state', old: p.state, new: to }], null);
}

const refundInput = z.object({
	amount: z.string({ error: 'Type the amount to refund' }).trim().min(1, 'Type the amount to refund').max(20, 'Type the amount to refund, e.g. 12.50'),
	reason: z.string().trim().max(300, 'At most 300 characters').optional().default('')
});

/** What is left to refund: the paid amount less what is refunded or being refunded. */
async function leftOf(t: Transaction, p: PaymentRow): Promise<number> {
	const [r] = await db().query<{ done: string | number | null; pending: string | number | null }>(
		`SELECT SUM(CASE WHEN state = 'done' THEN amount_minor ELSE 0 END) AS done, SUM(CASE WHEN state = 'pending' THEN amount_minor ELSE 0 END) AS pending
		 FROM payment_refunds WHERE payment_id = ?`,
		{ replacements: [p.id], type: QueryTypes.SELECT, transaction: t }
	);
	const refunded = Math.max(Number(p.refunded_minor), Number(r?.done ?? 0));
	return Number(p.amount_minor) - refunded - Number(r?.pending ?? 0);
}

/**
 * Move a payment's refunded total forward to `total` (never back), and to "refunded" when
 * nothing is left; every change is an audit row.
 */
async function refundedUpTo(t: Transaction, actor: Actor, p: PaymentRow, total: number) {
	const before = Number(p.refunded_minor);
	if (total <= before) return false;
	const full = total >= Number(p.amount_minor);
	await db().query(
		`UPDATE payments SET refunded_minor = ?, version = version + 1, updated_at = UTC_TIMESTAMP(3)${full ? ", state = 'refunded'" : ''} WHERE id = ?`,
		{ replacements: [total, p.id], transaction: t, type: QueryTypes.UPDATE }
	);
	await writeAudit(t, actor, 'payment', p.id, 'refund', [{ field: 'refundedMinor', old: before, new: total }], null);
	if (full && p.state !== 'refunded') await writeAudit(t, actor, 'payment', p.id, 'update', [{ field: 'state', old: p.state, new: 'refunded' }], null);
	p.refunded_minor = total;
	if (full) p.state = 'refunded';
	return true;
}

export class RefundFailedError extends AppError {
	constructor(detail: string) {
		super(502, 'refund_failed', `The card provider did not refund it: ${detail}. Nothing was refunded; try again later.`);
	}
}

/**
 * Refund part or all of what is left of a paid payment (leads and owners, by the rulebook's
 * `refuseRefund`): `amount` is typed in the payment's currency ("12.50"), turned into minor
 * units exactly. A card refund goes through the provider (our refund's id as its idempotency
 * key); cash and bank transfer refunds are recorded. Several partial refunds may add up to
 * the whole, never more: the check runs under a lock on the payment and counts refunds still
 * with the provider.
 */
export async function refundPayment(actor: Actor, paymentId: string, input: unknown) {
	if (!z.uuid().safeParse(paymentId).success) throw new NotFoundError('Payment');
	const r = refundInput.safeParse(input);
	const held = await db().transaction(async (t) => {
		const row = await lockPayment(t, 'id = ? AND workshop_id = ?', [paymentId, actor.workshopId]);
		if (!row) throw new NotFoundError('Payment');
		const job = await Job.findOne({ where: { id: row.job_id, workshopId: actor.workshopId }, transaction: t });
		if (!job || !seesJob(actor, job)) throw new NotFoundError('Payment');
		const currency = row.currency as Currency;
		const left = await leftOf(t, row);
		if (!r.success) {
			refuseRefund(actor, { state: row.state, leftMinor: left }, 1, formatMoney(left, currency));
			throw ValidationError.fromZod(r.error);
		}
		const amountMinor = parseAmount(r.data.amount.replace(/^\p{Sc}\s*/u, ''), currency);
		if (amountMinor === null) {
			refuseRefund(actor, { state: row.state, leftMinor: left }, 1, formatMoney(left, currency));
			throw new ValidationError({ amount: `Type the amount in ${currency}, e.g. ${toDecimal(Math.min(left, 1250), currency)}` });
		}
		refuseRefund(actor, { state: row.state, leftMinor: left }, amountMinor, formatMoney(left, currency));
		if (row.method === 'card' && !row.provider_payment) throw new ForbiddenError('The card provider has not confirmed this payment yet');
		const id = uuidv7();
		await db().query(
			`INSERT INTO payment_refunds (id, workshop_id, payment_id, amount_minor, currency, method, state, reason, created_by, created_at, updated_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
			{
				replacements: [id, actor.workshopId, row.id, amountMinor, row.currency, row.method, row.method === 'card' ? 'pending' : 'done', r.data.reason || null, actor.userId],
				transaction: t,
				type: QueryTypes.INSERT
			}
		);
		if (row.method !== 'card') await refundedUpTo(t, actor, row, Number(row.refunded_minor) + amountMinor);
		return { id, row, amountMinor, currency };
	});
	if (held.row.method === 'card') {
		let made: { refundId: string; status: string };
		try {
			made = await provider().refund(held.row.provider_payment!, held.amountMinor, held.id);
		} catch (e) {
			const detail = e instanceof Error ? e.message : 'no answer';
			await db().query(`UPDATE payment_refunds SET state = 'failed', failure = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?`, {
				replacements: [detail.slice(0, 300), held.id],
				type: QueryTypes.UPDATE
			});
			throw new RefundFailedError(detail);
		}
		// The provider's own "refunded" event may have arrived first: totals only move forward.
		await db().transaction(async (t) => {
			await db().query(`UPDATE payment_refunds SET state = 'done', provider_refund = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?`, {
				replacements: [made.refundId, held.id],
				transaction: t,
				type: QueryTypes.UPDATE
			});
			const row = await lockPayment(t, 'id = ?', [held.row.id]);
			const [{ done }] = await db().query<{ done: string | number }>(
				`SELECT COALESCE(SUM(amount_minor), 0) AS done FROM payment_refunds WHERE payment_id = ? AND state = 'done'`,
				{ replacements: [held.row.id], type: QueryTypes.SELECT, transaction: t }
			);
			if (row) await refundedUpTo(t, actor, row, Number(done));
		});
	}
	return { refundId: held.id, amountMinor: held.amountMinor, currency: held.currency };
}

export type WebhookOutcome = 'applied' | 'duplicate' | 'stale' | 'ignored' | 'mismatch' | 'unknown';

/**
 * Apply one provider webhook: 400 for a wrong signature (`BadSignatureError`), then in one
 * transaction: the event id recorded (a repeat is `duplicate` and changes nothing), the
 * payment found by its session, payment or our id, and its state moved forward only.
 */
export async function applyWebhook(rawBody: string, signature: string | null): Promise<WebhookOutcome> {
	const ev: PayEvent = provider().readWebhook(rawBody, signature);
	return db().transaction(async (t) => {
		const [, inserted] = (await db().query(
			`INSERT IGNORE INTO payment_events (event_id, type, provider_created, outcome, received_at) VALUES (?, ?, ?, 'pending', UTC_TIMESTAMP(3))`,
			{ replacements: [ev.id, ev.type, ev.created], transaction: t, type: QueryTypes.INSERT }
		)) as unknown as [unknown, number];
		if (!inserted) return 'duplicate';
		const outcome = await applyEvent(ev, t);
		await db().query('UPDATE payment_events SET outcome = ?, payment_id = ?, workshop_id = ? WHERE event_id = ?', {
			replacements: [outcome.outcome, outcome.payment?.id ?? null, outcome.payment?.workshop_id ?? null, ev.id],
			transaction: t,
			type: QueryTypes.UPDATE
		});
		return outcome.outcome;
	});
}

async function applyEvent(ev: PayEvent, t: Transaction): Promise<{ outcome: WebhookOutcome; payment?: PaymentRow }> {
	if (ev.kind === 'other') return { outcome: 'ignored' };
	const p =
		(ev.sessionId && (await lockPayment(t, 'provider_session = ?', [ev.sessionId]))) ||
		(ev.paymentId && (await lockPayment(t, 'id = ?', [ev.paymentId]))) ||
		(ev.paymentRef && (await lockPayment(t, 'provider_payment = ?', [ev.paymentRef]))) ||
		null;
	if (!p || p.method !== 'card') return { outcome: 'unknown' };
	const actor = providerActor(p.workshop_id);
	const to: PaymentState = ev.kind;
	if (to === 'paid' || to === 'refunded') {
		// Never trust an amount or currency that is not the one we asked for.
		const tooMuch = to === 'refunded' && (ev.refundedMinor === null || ev.refundedMinor < 0 || ev.refundedMinor > Number(p.amount_minor));
		if (tooMuch || ev.amountMinor !== Number(p.amount_minor) || (ev.currency && ev.currency !== p.currency.toUpperCase())) {
			await writeAudit(t, actor, 'payment', p.id, 'mismatch', [{ field: 'amountMinor', old: Number(p.amount_minor), new: ev.amountMinor }], null);
			return { outcome: 'mismatch', payment: p };
		}
	}
	if (to === 'refunded') {
		// The provider's figure is the charge's refunded total so far: an older (smaller) one
		// arriving late changes nothing; a refund implies the payment was paid.
		if (RANK[p.state] < RANK.paid) {
			await moveState(t, actor, p, 'paid', { paymentRef: ev.paymentRef });
			p.state = 'paid';
		}
		return { outcome: (await refundedUpTo(t, actor, p, ev.refundedMinor!)) ? 'applied' : 'stale', payment: p };
	}
	if (RANK[to] <= RANK[p.state]) return { outcome: 'stale', payment: p };
	await moveState(t, actor, p, to, {
		...(to === 'failed' ? { failure: ev.failure } : {}),
		paymentRef: ev.paymentRef
	});
	return { outcome: 'applied', payment: p };
}

export { BadSignatureError };

export type PaymentView = {
	id: string;
	purpose: Purpose;
	method: Method;
	state: PaymentState;
	amountMinor: number;
	currency: Currency;
	amount: string;
	createdAt: Date;
	paidAt: Date | null;
	createdBy: string;
	failure: string | null;
	note: string | null;
	payUrl: string | null;
	history: { state: string; at: Date; by: string }[];
	/** Refunded so far and what is left, in minor units and as people read them. */
	refundedMinor: number;
	refunded: string;
	leftMinor: number;
	left: string;
	refunds: { id: string; amount: string; amountMinor: number; state: 'pending' | 'done' | 'failed'; reason: string | null; failure: string | null; at: Date; by: string }[];
};

/** A job's payments with who asked or recorded them, when, and every change of state. */
export async function paymentsOfJob(actor: Actor, jobId: string): Promise<PaymentView[]> {
	await jobFor(actor, jobId);
	const rows = await db().query<Record<string, unknown>>(
		`SELECT id, purpose, method, state, amount_minor, refunded_minor, currency, created_at, paid_at, created_by, failure, note, pay_url
		 FROM payments WHERE workshop_id = ? AND job_id = ? ORDER BY created_at DESC`,
		{ replacements: [actor.workshopId, jobId], type: QueryTypes.SELECT }
	);
	if (!rows.length) return [];
	const refunds = await db().query<Record<string, unknown>>(
		`SELECT id, payment_id, amount_minor, currency, state, reason, failure, created_by, created_at FROM payment_refunds
		 WHERE workshop_id = ? AND payment_id IN (?) ORDER BY created_at, id`,
		{ replacements: [actor.workshopId, rows.map((r) => r.id)], type: QueryTypes.SELECT }
	);
	const audit = await db().query<{ entity_id: string; user_id: string | null; device_id: string | null; at: Date; new_value: string | null }>(
		`SELECT entity_id, user_id, device_id, at, new_value FROM audit_log WHERE workshop_id = ? AND entity = 'payment' AND field = 'state' AND entity_id IN (?) ORDER BY id`,
		{ replacements: [actor.workshopId, rows.map((r) => r.id)], type: QueryTypes.SELECT }
	);
	const userIds = [...new Set([...rows.map((r) => r.created_by), ...audit.map((a) => a.user_id), ...refunds.map((f) => f.created_by)].filter(Boolean))] as string[];
	const users = userIds.length ? await User.findAll({ where: { id: userIds, workshopId: actor.workshopId } }) : [];
	const name = (id: unknown, device: string | null = null) =>
		id ? (users.find((u) => u.id === id)?.name ?? 'Former user') : device === 'payment-provider' ? 'Card provider' : 'Customer (by link)';
	return rows.map((r) => ({
		id: r.id as string,
		purpose: r.purpose as Purpose,
		method: r.method as Method,
		state: r.state as PaymentState,
		amountMinor: Number(r.amount_minor),
		currency: r.currency as Currency,
		amount: formatMoney(Number(r.amount_minor), r.currency as Currency),
		createdAt: new Date(r.created_at as string),
		paidAt: r.paid_at ? new Date(r.paid_at as string) : null,
		createdBy: name(r.created_by),
		failure: (r.failure as string | null) ?? null,
		note: (r.note as string | null) ?? null,
		payUrl: r.state === 'pending' ? ((r.pay_url as string | null) ?? null) : null,
		history: audit
			.filter((a) => a.entity_id === r.id)
			.map((a) => ({ state: JSON.parse(a.new_value ?? 'null') as string, at: new Date(a.at), by: name(a.user_id, a.device_id) })),
		...refundFigures(r),
		refunds: refunds
			.filter((f) => f.payment_id === r.id)
			.map((f) => ({
				id: f.id as string,
				amountMinor: Number(f.amount_minor),
				amount: formatMoney(Number(f.amount_minor), f.currency as Currency),
				state: f.state as 'pending' | 'done' | 'failed',
				reason: (f.reason as string | null) ?? null,
				failure: (f.failure as string | null) ?? null,
				at: new Date(f.created_at as string),
				by: name(f.created_by)
			}))
	}));
}

/** A payment's refunded total and what is left (only money received can be refunded). */
function refundFigures(r: Record<string, unknown>) {
	const cur = r.currency as Currency;
	const refundedMinor = Number(r.refunded_minor ?? 0);
	const received = r.state === 'paid' || r.state === 'refunded';
	const leftMinor = received ? Number(r.amount_minor) - refundedMinor : 0;
	return { refundedMinor, refunded: formatMoney(refundedMinor, cur), leftMinor, left: formatMoney(leftMinor, cur) };
}

/**
 * Totals per currency for the overview and the payments list: money received (paid, then
 * perhaps refunded), refunded, and kept (received less refunded); and approved quotes not
 * paid yet.
 */
export async function paymentTotals(workshopId: string) {
	const paid = await db().query<{ currency: string; received: string | number; refunded: string | number; n: number }>(
		`SELECT currency, SUM(amount_minor) AS received, SUM(refunded_minor) AS refunded, COUNT(*) AS n FROM payments
		 WHERE workshop_id = ? AND state IN ('paid', 'refunded') GROUP BY currency`,
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	const outstanding = await db().query<{ currency: string; total: string | number; n: number }>(
		`SELECT q.currency, SUM(q.total_minor) AS total, COUNT(*) AS n FROM quotes q
		 WHERE q.workshop_id = ? AND q.state = 'approved' AND q.deleted_at IS NULL
		   AND NOT EXISTS (SELECT 1 FROM payments p WHERE p.quote_id = q.id AND p.state IN ('paid', 'refunded'))
		 GROUP BY q.currency`,
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	return {
		paid: paid.map((r) => {
			const cur = r.currency as Currency;
			const received = Number(r.received);
			const refunded = Number(r.refunded);
			const kept = sum([received, -refunded]);
			return {
				currency: cur,
				/** Kept: received less refunded. */
				totalMinor: kept,
				total: formatMoney(kept, cur),
				receivedMinor: received,
				received: formatMoney(received, cur),
				refundedMinor: refunded,
				refunded: formatMoney(refunded, cur),
				count: Number(r.n)
			};
		}),
		outstanding: outstanding.map((r) => ({
			currency: r.currency as Currency,
			totalMinor: Number(r.total),
			total: formatMoney(Number(r.total), r.currency as Currency),
			count: Number(r.n)
		}))
	};
}

/** The sortable columns of the payments list (`-key` for descending). */
export const PAYMENT_SORTS = ['when', 'job', 'purpose', 'method', 'amount', 'refunded', 'state', 'by'] as const;
const PAYMENT_SORT_COLUMNS: Record<(typeof PAYMENT_SORTS)[number], string> = {
	when: 'p.created_at',
	job: 'j.number',
	purpose: 'p.purpose',
	method: 'p.method',
	amount: 'p.amount_minor',
	refunded: 'p.refunded_minor',
	state: 'p.state',
	by: 'u.name'
};
const paymentListQuery = z.object({
	sort: sortParam(PAYMENT_SORTS, '-when'),
	page: pageParam,
	pageSize: pageSizeParam(25)
});

/** One page of the workshop's payments for the desk's list, sorted by any column (leads and owners). */
export async function listPayments(actor: Actor, input: unknown = {}) {
	if (!isLead(actor)) throw new ForbiddenError('Only a workshop lead sees every payment');
	const r = paymentListQuery.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	const { sort, page, pageSize } = r.data;
	const from = 'payments p JOIN jobs j ON j.id = p.job_id LEFT JOIN users u ON u.id = p.created_by';
	const where = new Where().and('p.workshop_id = ?', actor.workshopId);
	const { ids, total } = await pageOfIds('p.id', from, where, orderBy(sort, PAYMENT_SORT_COLUMNS, 'p.id'), page, pageSize);
	const rows = ids.length
		? await db().query<Record<string, unknown>>(
				`SELECT p.id, p.job_id, j.number, p.purpose, p.method, p.state, p.amount_minor, p.refunded_minor, p.currency, p.created_at, p.paid_at, u.name AS by_name
				 FROM ${from} WHERE p.id IN (?)`,
				{ replacements: [ids], type: QueryTypes.SELECT }
			)
		: [];
	const items = inOrder(
		ids,
		rows.map((row) => ({ ...row, id: row.id as string }) as Record<string, unknown> & { id: string })
	).map((row) => ({
		id: row.id,
		jobId: row.job_id as string,
		jobNumber: Number(row.number),
		purpose: row.purpose as Purpose,
		method: row.method as Method,
		state: row.state as PaymentState,
		amountMinor: Number(row.amount_minor),
		amount: formatMoney(Number(row.amount_minor), row.currency as Currency),
		...refundFigures(row),
		at: new Date(row.created_at as string),
		by: (row.by_name as string | null) ?? 'The customer, on their link'
	}));
	return { items, total, page, pageSize };
}
