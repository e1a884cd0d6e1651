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
import { formatMoney, quoteTotals, type Currency } from '../../money';
import { isLead } from '../../roles';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { Job, Quote, User } from '../db/models';
import { AppError, ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { readPricing } from '../quotes/pricing';
import { seesJob } from '../services/rules';
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

/** Refund a paid payment in full (leads and owners): card through the provider, cash and transfers recorded. */
export async function refundPayment(actor: Actor, paymentId: string) {
	if (!isLead(actor)) throw new ForbiddenError('Only a workshop lead can refund a payment');
	if (!z.uuid().safeParse(paymentId).success) throw new NotFoundError('Payment');
	const p = await db().transaction(async (t) => {
		const row = await lockPayment(t, 'id = ? AND workshop_id = ?', [paymentId, actor.workshopId]);
		if (!row) throw new NotFoundError('Payment');
		if (row.state !== 'paid') throw new ForbiddenError('Only a paid payment can be refunded');
		return row;
	});
	const amount = Number(p.amount_minor) - Number(p.refunded_minor);
	if (p.method === 'card') {
		if (!p.provider_payment) throw new ForbiddenError('The provider has not confirmed this payment yet');
		await provider().refund(p.provider_payment, amount);
	}
	// The provider's own "refunded" event finds it already refunded (state only moves forward).
	await db().transaction(async (t) => {
		const row = await lockPayment(t, 'id = ?', [p.id]);
		if (row && RANK[row.state] < RANK.refunded) await moveState(t, actor, row, 'refunded', { refundedMinor: Number(row.amount_minor) });
	});
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
	if (RANK[to] <= RANK[p.state]) return { outcome: 'stale', payment: p };
	if (to === 'paid' || to === 'refunded') {
		// Never trust an amount or currency that is not the one we asked for.
		if (ev.amountMinor !== Number(p.amount_minor) || (ev.currency && ev.currency !== p.currency.toUpperCase())) {
			await writeAudit(t, actor, 'payment', p.id, 'mismatch', [{ field: 'amountMinor', old: Number(p.amount_minor), new: ev.amountMinor }], null);
			return { outcome: 'mismatch', payment: p };
		}
	}
	if (to === 'refunded' && ev.refundedMinor !== Number(p.amount_minor)) return { outcome: 'ignored', payment: p };
	await moveState(t, actor, p, to, {
		...(to === 'failed' ? { failure: ev.failure } : {}),
		...(to === 'refunded' ? { refundedMinor: ev.refundedMinor ?? 0 } : {}),
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
};

/** A job's payments with who asked or recorded them, when, and every change of state. */
export async function paymentsOfJob(actor: Actor, jobId: string): Promise<PaymentView[]> {
	await jobFor(actor, jobId);
	const rows = await db().query<Record<string, unknown>>(
		`SELECT id, purpose, method, state, amount_minor, currency, created_at, paid_at, created_by, failure, note, pay_url
		 FROM payments WHERE workshop_id = ? AND job_id = ? ORDER BY created_at DESC`,
		{ replacements: [actor.workshopId, jobId], type: QueryTypes.SELECT }
	);
	if (!rows.length) return [];
	const audit = await db().query<{ entity_id: string; user_id: string | null; device_id: string | null; at: Date; new_value: string | null }>(
		`SELECT entity_id, user_id, device_id, at, new_value FROM audit_log WHERE workshop_id = ? AND entity = 'payment' AND field = 'state' AND entity_id IN (?) ORDER BY id`,
		{ replacements: [actor.workshopId, rows.map((r) => r.id)], type: QueryTypes.SELECT }
	);
	const userIds = [...new Set([...rows.map((r) => r.created_by), ...audit.map((a) => a.user_id)].filter(Boolean))] as string[];
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
			.map((a) => ({ state: JSON.parse(a.new_value ?? 'null') as string, at: new Date(a.at), by: name(a.user_id, a.device_id) }))
	}));
}

/** Paid and outstanding totals per currency for the overview (approved quotes not yet paid). */
export async function paymentTotals(workshopId: string) {
	const paid = await db().query<{ currency: string; total: string | number; n: number }>(
		`SELECT currency, SUM(amount_minor - refunded_minor) AS total, COUNT(*) AS n FROM payments WHERE workshop_id = ? AND state = 'paid' GROUP BY currency`,
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	const outstanding = await db().query<{ currency: string; total: string | number; n: number }>(
		`SELECT q.currency, SUM(q.total_minor) AS total, COUNT(*) AS n FROM quotes q
		 WHERE q.workshop_id = ? AND q.state = 'approved' AND q.deleted_at IS NULL
		   AND NOT EXISTS (SELECT 1 FROM payments p WHERE p.quote_id = q.id AND p.state IN ('paid', 'refunded'))
		 GROUP BY q.currency`,
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	const fmt = (r: { currency: string; total: string | number; n: number }) => ({
		currency: r.currency as Currency,
		totalMinor: Number(r.total),
		total: formatMoney(Number(r.total), r.currency as Currency),
		count: Number(r.n)
	});
	return { paid: paid.map(fmt), outstanding: outstanding.map(fmt) };
}

/** The workshop's latest payments for the desk's list (newest first, one page). */
export async function listPayments(actor: Actor, page = 1, pageSize = 25) {
	if (!isLead(actor)) throw new ForbiddenError('Only a workshop lead sees every payment');
	const offset = (Math.max(1, page) - 1) * pageSize;
	const rows = await db().query<Record<string, unknown>>(
		`SELECT p.id, p.job_id, j.number, p.purpose, p.method, p.state, p.amount_minor, p.currency, p.created_at, p.paid_at, u.name AS by_name
		 FROM payments p JOIN jobs j ON j.id = p.job_id LEFT JOIN users u ON u.id = p.created_by
		 WHERE p.workshop_id = ? ORDER BY p.created_at DESC LIMIT ? OFFSET ?`,
		{ replacements: [actor.workshopId, pageSize, offset], type: QueryTypes.SELECT }
	);
	const [{ n }] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM payments WHERE workshop_id = ?', {
		replacements: [actor.workshopId],
		type: QueryTypes.SELECT
	});
	return {
		total: Number(n),
		page,
		pageSize,
		items: rows.map((r) => ({
			id: r.id as string,
			jobId: r.job_id as string,
			jobNumber: Number(r.number),
			purpose: r.purpose as Purpose,
			method: r.method as Method,
			state: r.state as PaymentState,
			amount: formatMoney(Number(r.amount_minor), r.currency as Currency),
			at: new Date(r.created_at as string),
			by: (r.by_name as string | null) ?? 'The customer, on their link'
		}))
	};
}
