/**
 * Quotes on the one write path (a mutable synced record, made on the phone offline): the
 * client names parts, hours and the diagnostic fee (`schemas/quote.ts`); the server prices
 * them (`quotes/pricing.ts`) when the quote is made and again when what is on it changes;
 * the priced lines, tax, totals, currency and state are the server's (`serverOwned`).
 *
 * The job follows the quote: a new quote moves an open or testing job to "Awaiting
 * authorisation" (the status it had is kept on the quote); an approval moves it to
 * "Awaiting parts", a refusal back to where it was. A newer quote replaces the job's
 * earlier unanswered ones. A verbal answer recorded by the technician (`verbalDecision`
 * with the customer's name and how) answers the quote as a link answer does, marked
 * `answeredVia: 'verbal'` with who recorded it.
 */
import { Op, type Transaction } from 'sequelize';
import { quoteCreate, quotePatch, type QuoteRequest } from '../../schemas/quote';
import type { Actor } from '../auth/types';
import { Job, Quote } from '../db/models';
import { priceRequest } from '../quotes/pricing';
import { jobs } from './jobs';
import { quoteRules } from './rules';
import { defineAggregate } from './write-path';

export const QUOTE_FIELDS = [
	'jobId',
	'request',
	'lines',
	'currency',
	'taxRateBp',
	'netMinor',
	'taxMinor',
	'totalMinor',
	'state',
	'verbalName',
	'verbalHow',
	'verbalDecision',
	'answeredAt',
	'answeredName',
	'answeredVia',
	'answeredBy',
	'statusBefore'
] as const;

type Row = { id: string; version: number; deletedAt: Date | null; get: (k: string) => unknown };

export const quoteRecord = (r: Row): Record<string, unknown> & { id: string; version: number } => ({
	id: r.id,
	version: r.version,
	...Object.fromEntries(QUOTE_FIELDS.map((f) => [f, r.get(f) ?? null])),
	createdBy: (r.get('createdBy') as string | null) ?? null,
	createdAt: r.get('createdAt') ?? null,
	deleted: r.deletedAt != null
});

/** The job's status after the customer's answer (or a new quote). */
async function moveJob(actor: Actor, jobId: string, to: string | null, t: Transaction, only?: string[]) {
	if (!to) return;
	const job = await Job.findOne({ where: { id: jobId, workshopId: actor.workshopId }, transaction: t, lock: t.LOCK.UPDATE });
	if (!job || job.deletedAt || job.status === to || job.status === 'closed') return;
	if (only && !only.includes(job.status)) return;
	await jobs.update(actor, job.id, job.version, { status: to }, { transaction: t });
}

export const quotes = defineAggregate({
	entity: 'quote',
	model: Quote,
	createSchema: quoteCreate,
	patchSchema: quotePatch,
	rules: quoteRules,
	serverOwned: [
		'lines',
		'currency',
		'taxRateBp',
		'netMinor',
		'taxMinor',
		'totalMinor',
		'state',
		'answeredAt',
		'answeredName',
		'answeredVia',
		'answeredBy',
		'statusBefore'
	],
	prepareCreate: async (actor, f, t) => {
		const job = await Job.findOne({ where: { id: f.jobId as string, workshopId: actor.workshopId }, transaction: t });
		return {
			...f,
			...(await priceRequest(actor.workshopId, f.request as QuoteRequest, t)),
			state: 'draft',
			statusBefore: job?.status ?? null
		};
	},
	jobIdOf: (r) => r.get('jobId') as string,
	afterWrite: async (actor, row, action, changed, t) => {
		const has = (k: string) => changed.some((c) => c.field === k);
		const jobId = row.get('jobId') as string;
		if (action === 'create') {
			// Earlier unanswered quotes of the job are replaced by this one.
			const older = await Quote.findAll({
				where: { workshopId: actor.workshopId, jobId, id: { [Op.ne]: row.id }, state: ['draft', 'sent'], deletedAt: { [Op.is]: null } },
				transaction: t
			});
			for (const q of older) await quotes.update(actor, q.id, q.version, {}, { transaction: t, serverFields: { state: 'replaced' } });
			await moveJob(actor, jobId, 'awaiting_authorisation', t, ['open', 'testing']);
		}
		if (action === 'update' && has('request')) {
			const priced = await priceRequest(actor.workshopId, row.get('request') as QuoteRequest, t);
			await quotes.update(actor, row.id, row.version, {}, { transaction: t, serverFields: priced });
		}
		if (action === 'update' && has('verbalDecision') && row.get('verbalDecision')) {
			await answerQuote(actor, row.id, row.get('verbalDecision') as 'approved' | 'declined', {
				name: row.get('verbalName') as string,
				via: 'verbal',
				by: actor.userId
			}, t);
		}
	},
	toRecord: quoteRecord as never
});

/**
 * Record the customer's answer on a quote and move the job: approved → "Awaiting parts",
 * declined → the status the job had before the quote. `actor` is who records it (the
 * customer's link answers as the workshop itself, with no user).
 */
export async function answerQuote(
	actor: Actor,
	id: string,
	decision: 'approved' | 'declined',
	who: { name: string; via: 'link' | 'verbal'; by: string | null },
	t: Transaction
) {
	const q = await Quote.findOne({ where: { id, workshopId: actor.workshopId }, transaction: t, lock: t.LOCK.UPDATE });
	if (!q) return null;
	const rec = await quotes.update(actor, q.id, q.version, {}, {
		transaction: t,
		serverFields: { state: decision, answeredAt: new Date(), answeredName: who.name, answeredVia: who.via, answeredBy: who.by }
	});
	await moveJob(actor, q.jobId, decision === 'approved' ? 'awaiting_parts' : (q.statusBefore ?? 'testing'), t, [
		'open',
		'testing',
		'awaiting_authorisation'
	]);
	return rec;
}

/** The actor a customer's answer by link is written as: the workshop, no user, no device. */
export const customerActor = (workshopId: string): Actor => ({
	userId: null as unknown as string,
	workshopId,
	role: 'owner',
	deviceId: 'customer-link'
});

/** The live quotes of a job, newest first. */
export async function quotesOfJob(actor: Actor, jobId: string) {
	const rows = await Quote.findAll({
		where: { workshopId: actor.workshopId, jobId, deletedAt: { [Op.is]: null } },
		order: [['createdAt', 'DESC']]
	});
	return rows.map((r) => quoteRecord(r as never));
}
