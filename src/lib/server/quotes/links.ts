/**
 * The customer's quote link, `/q/<token>`: 256 random bits in the address, only the SHA-256
 * stored (`reports/token.ts`), open for `QUOTE_LINK_DAYS`. Making one keeps the exact quote
 * the customer will see (`shown`: the workshop, job, vehicle, priced lines, tax and total)
 * and marks the quote sent; it can go by e-mail through the report outbox, or be opened on
 * the customer's phone from a QR code on the technician's.
 *
 * The answer (approve or decline, the name typed, the time) is taken once per link, only
 * while the link is open and the quote is still the one it shows; it answers the quote
 * (`services/quotes.ts`, `answerQuote`) and moves the job in the same transaction. A link
 * whose quote is not in the link's workshop is not there (404); an expired one is gone
 * (410); an answered one shows its answer and takes no other (409).
 */
import { createHash } from 'node:crypto';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { z } from 'zod';
import { formatMoney, formatRate, type Currency } from '../../money';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { Customer, Job, Quote, Vehicle, Workshop } from '../db/models';
import { AppError, ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { enqueueMail, LINK_PLACEHOLDER } from '../mail/outbox';
import { hashReportToken, looksLikeToken, newReportToken } from '../reports/token';
import { emailBlock } from '../reports/service';
import { answerQuote, customerActor, quotes } from '../services/quotes';
import { seesJob } from '../services/rules';
import type { PricedLine } from './pricing';

/** How long a quote link stays open. */
export const QUOTE_LINK_DAYS = 7;

/** The exact quote a customer is shown (kept with the link and with the answer). */
export type ShownQuote = {
	workshopName: string;
	jobNumber: number;
	vehicle: string | null;
	customerName: string | null;
	currency: Currency;
	taxRateBp: number;
	lines: { text: string; quantity: string; amount: string; amountMinor: number }[];
	net: string;
	tax: string;
	taxLabel: string;
	total: string;
	netMinor: number;
	taxMinor: number;
	totalMinor: number;
	quoteId: string;
	quoteVersion: number;
};

export class LinkGoneError extends AppError {
	constructor(message = 'This link has expired. Ask the workshop for a new one.') {
		super(410, 'gone', message);
	}
}
/** A link made before the latest one of its quote: refused, the customer uses the new one. */
export const REPLACED_MESSAGE = 'The workshop has sent you a newer link for this quote. Please use the latest link.';

export class AlreadyAnsweredError extends AppError {
	constructor(message = 'This quote has already been answered.') {
		super(409, 'answered', message);
	}
}

const quantityWords = (l: PricedLine) =>
	l.kind === 'labour'
		? `${(l.quantityMilli / 1000).toString()} h`
		: l.quantityMilli === 1000
			? '1'
			: (l.quantityMilli / 1000).toString();

/** The quote in the words and figures the customer sees. */
export function shownOf(q: Quote, job: Job, names: { workshop: string; vehicle: string | null; customer: string | null }): ShownQuote {
	const cur = q.currency as Currency;
	const lines = (q.lines ?? []) as PricedLine[];
	return {
		workshopName: names.workshop,
		jobNumber: job.number,
		vehicle: names.vehicle,
		customerName: names.customer,
		currency: cur,
		taxRateBp: q.taxRateBp ?? 0,
		lines: lines.map((l) => ({ text: l.text, quantity: quantityWords(l), amount: formatMoney(l.amountMinor, cur), amountMinor: l.amountMinor })),
		net: formatMoney(q.netMinor ?? 0, cur),
		tax: formatMoney(q.taxMinor ?? 0, cur),
		taxLabel: `Tax at ${formatRate(q.taxRateBp ?? 0)}`,
		total: formatMoney(q.totalMinor ?? 0, cur),
		netMinor: q.netMinor ?? 0,
		taxMinor: q.taxMinor ?? 0,
		totalMinor: q.totalMinor ?? 0,
		quoteId: q.id,
		quoteVersion: q.version
	};
}

/** The priced content of a quote, to tell whether the quote changed since a link showed it. */
const digestOf = (s: Pick<ShownQuote, 'lines' | 'currency' | 'taxRateBp' | 'totalMinor'>) =>
	createHash('sha256').update(JSON.stringify([s.lines, s.currency, s.taxRateBp, s.totalMinor])).digest('hex');

async function partiesOf(workshopId: string, job: Job, t?: Transaction) {
	const [w, v, c] = await Promise.all([
		Workshop.findByPk(workshopId, { transaction: t }),
		job.vehicleId ? Vehicle.findOne({ where: { id: job.vehicleId, workshopId }, transaction: t }) : null,
		job.customerId ? Customer.findOne({ where: { id: job.customerId, workshopId }, transaction: t }) : null
	]);
	const vehicle = v ? [v.year, v.make, v.model].filter(Boolean).join(' ') + (v.plate ? ` (${v.plate})` : '') : null;
	return { workshop: w?.name ?? '', vehicle, customer: c?.name ?? null, customerRow: c };
}

export type MadeLink = { url: string; token: string; expiresAt: Date; emailed: boolean; emailBlock: string | null };

/**
 * Make a link for the customer to answer a quote (whoever may work on the job). With
 * `email`, the link goes to the customer by the report outbox when they have an address and
 * consent; otherwise `emailBlock` says why not (the link still works, e.g. as a QR code).
 */
export async function makeQuoteLink(actor: Actor, quoteId: string, baseUrl: string, opts: { email?: boolean } = {}, now = new Date()): Promise<MadeLink> {
	if (!z.uuid().safeParse(quoteId).success) throw new NotFoundError('Quote');
	return db().transaction(async (t) => {
		const q = await Quote.findOne({ where: { id: quoteId, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } }, transaction: t, lock: t.LOCK.UPDATE });
		if (!q) throw new NotFoundError('Quote');
		const job = await Job.findOne({ where: { id: q.jobId, workshopId: actor.workshopId }, transaction: t });
		if (!job || !seesJob(actor, job)) throw new NotFoundError('Quote');
		if (!['draft', 'sent'].includes(q.state)) throw new ForbiddenError('The customer has answered this quote; make a new one to ask again');
		const p = await partiesOf(actor.workshopId, job, t);
		const shown = shownOf(q, job, p);
		const token = newReportToken();
		const id = uuidv7();
		const expiresAt = new Date(now.getTime() + QUOTE_LINK_DAYS * 86_400_000);
		// A fresh link retires every unanswered older one of the quote (they are refused).
		await db().query('UPDATE quote_links SET replaced_at = ? WHERE quote_id = ? AND workshop_id = ? AND answered_at IS NULL AND replaced_at IS NULL', {
			replacements: [now, q.id, actor.workshopId],
			transaction: t,
			type: QueryTypes.UPDATE
		});
		await db().query(
			`INSERT INTO quote_links (id, workshop_id, quote_id, token_hash, expires_at, created_by, created_at, shown)
			 VALUES (?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3), ?)`,
			{ replacements: [id, actor.workshopId, q.id, hashReportToken(token), expiresAt, actor.userId, JSON.stringify(shown)], transaction: t, type: QueryTypes.INSERT }
		);
		if (q.state === 'draft') await quotes.update(actor, q.id, q.version, {}, { transaction: t, serverFields: { state: 'sent' } });
		await writeAudit(t, actor, 'quote', q.id, 'link', [{ field: 'link', old: null, new: { id, expiresAt } }], null);
		const url = `${baseUrl.replace(/\/$/, '')}/q/${token}`;
		let block: string | null = null;
		let emailed = false;
		if (opts.email) {
			block = emailBlock(p.customerRow as never);
			if (!block) {
				await enqueueMail(t, {
					workshopId: actor.workshopId,
					reportId: null,
					idempotencyKey: `quote-${id}`,
					to: p.customerRow!.email!,
					subject: `Your quote from ${p.workshop}: job ${job.number}`,
					text: [
						`Hello ${p.customerRow!.name},`,
						'',
						`Here is the quote for ${p.vehicle ?? 'your vehicle'}: ${shown.total} including tax.`,
						...shown.lines.map((l) => `  ${l.text} (${l.quantity}): ${l.amount}`),
						'',
						`Please look at it and answer here: ${LINK_PLACEHOLDER}`,
						`The link works for ${QUOTE_LINK_DAYS} days.`,
						'',
						p.workshop
					].join('\n'),
					link: url,
					createdBy: actor.userId
				});
				emailed = true;
			}
		}
		return { url, token, expiresAt, emailed, emailBlock: block };
	});
}

type LinkRow = {
	id: string;
	workshop_id: string;
	quote_id: string;
	expires_at: Date;
	shown: string;
	answered_at: Date | null;
	decision: 'approved' | 'declined' | null;
	typed_name: string | null;
	replaced_at: Date | null;
};

async function findLink(token: string, t?: Transaction, lock = false): Promise<{ link: LinkRow; quote: Quote } | null> {
	if (!looksLikeToken(token)) return null;
	const [link] = await db().query<LinkRow>(
		`SELECT id, workshop_id, quote_id, expires_at, shown, answered_at, decision, typed_name, replaced_at FROM quote_links WHERE token_hash = ?${lock ? ' FOR UPDATE' : ''}`,
		{ replacements: [hashReportToken(token)], type: QueryTypes.SELECT, transaction: t }
	);
	if (!link) return null;
	// The quote must be in the link's own workshop (a link never opens another's quote).
	const quote = await Quote.findOne({ where: { id: link.quote_id, workshopId: link.workshop_id, deletedAt: { [Op.is]: null } }, transaction: t });
	return quote ? { link, quote } : null;
}

export type OpenedQuote = {
	shown: ShownQuote;
	expiresAt: Date;
	answer: { decision: 'approved' | 'declined'; name: string; at: Date } | null;
	/** Answered another way (by phone, or a newer quote) since this link was made. */
	closed: string | null;
	workshopId: string;
	quoteId: string;
	quoteState: string;
};

/** What `/q/<token>` shows: 404 when there is no such link, 410 when it expired unanswered. */
export async function openQuoteLink(token: string, now = new Date()): Promise<OpenedQuote> {
	const found = await findLink(token);
	if (!found) throw new NotFoundError('Quote');
	const { link, quote } = found;
	const answer = link.answered_at ? { decision: link.decision!, name: link.typed_name ?? '', at: new Date(link.answered_at) } : null;
	if (!answer && link.replaced_at) throw new LinkGoneError(REPLACED_MESSAGE);
	if (!answer && new Date(link.expires_at).getTime() <= now.getTime()) throw new LinkGoneError();
	const shown = JSON.parse(link.shown) as ShownQuote;
	let closed: string | null = null;
	if (!answer) {
		if (quote.state === 'approved' || quote.state === 'declined') closed = 'The workshop has already recorded your answer to this quote.';
		else if (quote.state !== 'draft' && quote.state !== 'sent') closed = 'The workshop has changed this quote. Ask them for the new one.';
		else if (digestOf(shownOf(quote, { number: shown.jobNumber } as Job, { workshop: '', vehicle: null, customer: null })) !== digestOf(shown))
			closed = 'The workshop has changed this quote. Ask them for the new one.';
	}
	return { shown, expiresAt: new Date(link.expires_at), answer, closed, workshopId: link.workshop_id, quoteId: quote.id, quoteState: quote.state };
}

export const quoteAnswerInput = z.object({
	decision: z.enum(['approved', 'declined'], { error: 'Choose approve or decline' }),
	name: z.string({ error: 'Type your name' }).trim().min(2, 'Type your name').max(120, 'At most 120 characters')
});

/** Take the customer's answer (once): 404, 410, 409 as `openQuoteLink`; 400 for a missing name. */
export async function answerQuoteLink(token: string, input: unknown, now = new Date()) {
	const r = quoteAnswerInput.safeParse(input);
	if (!r.success) throw ValidationError.fromZod(r.error);
	const { decision, name } = r.data;
	return db().transaction(async (t) => {
		const found = await findLink(token, t, true);
		if (!found) throw new NotFoundError('Quote');
		const { link } = found;
		if (link.answered_at) throw new AlreadyAnsweredError();
		if (link.replaced_at) throw new LinkGoneError(REPLACED_MESSAGE);
		if (new Date(link.expires_at).getTime() <= now.getTime()) throw new LinkGoneError();
		const quote = await Quote.findOne({ where: { id: link.quote_id, workshopId: link.workshop_id }, transaction: t, lock: t.LOCK.UPDATE });
		const shown = JSON.parse(link.shown) as ShownQuote;
		if (!quote || !['draft', 'sent'].includes(quote.state)) throw new AlreadyAnsweredError('This quote has already been answered or replaced.');
		if (digestOf(shownOf(quote, { number: shown.jobNumber } as Job, { workshop: '', vehicle: null, customer: null })) !== digestOf(shown))
			throw new AlreadyAnsweredError('The workshop has changed this quote. Ask them for the new one.');
		await db().query('UPDATE quote_links SET answered_at = ?, decision = ?, typed_name = ? WHERE id = ?', {
			replacements: [now, decision, name, link.id],
			transaction: t,
			type: QueryTypes.UPDATE
		});
		const actor = customerActor(link.workshop_id);
		await writeAudit(t, actor, 'quote', quote.id, 'customer_answer', [{ field: 'answer', old: null, new: { decision, name, linkId: link.id, shown } }], null);
		await answerQuote(actor, quote.id, decision, { name, via: 'link', by: null }, t);
		return { decision, name, at: now };
	});
}

/** The links of a job's quotes (for the job page): when made, until when, the answer. */
export async function linksOfQuotes(actor: Actor, quoteIds: string[]) {
	if (!quoteIds.length) return [];
	const rows = await db().query<Record<string, unknown>>(
		`SELECT id, quote_id, expires_at, created_at, answered_at, decision, typed_name, replaced_at FROM quote_links
		 WHERE workshop_id = ? AND quote_id IN (?) ORDER BY created_at DESC`,
		{ replacements: [actor.workshopId, quoteIds], type: QueryTypes.SELECT }
	);
	return rows.map((r) => ({
		id: r.id as string,
		quoteId: r.quote_id as string,
		expiresAt: new Date(r.expires_at as string),
		createdAt: new Date(r.created_at as string),
		answeredAt: r.answered_at ? new Date(r.answered_at as string) : null,
		decision: (r.decision as string | null) ?? null,
		typedName: (r.typed_name as string | null) ?? null,
		replacedAt: r.replaced_at ? new Date(r.replaced_at as string) : null
	}));
}

export type LinkState = { expiresAt: Date; expired: boolean; answered: boolean } | null;

/**
 * The state of a quote's latest link (for the phone and the job page): when it runs out and
 * whether it has; null when no link was made yet. A quote whose latest link ran out
 * unanswered needs a fresh one.
 */
export function latestLinkState(links: { createdAt: Date; expiresAt: Date; answeredAt: Date | null; replacedAt: Date | null }[], now = new Date()): LinkState {
	const latest = [...links].filter((l) => !l.replacedAt).sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime())[0];
	if (!latest) return null;
	return { expiresAt: latest.expiresAt, expired: !latest.answeredAt && latest.expiresAt.getTime() <= now.getTime(), answered: Boolean(latest.answeredAt) };
}

/** The latest link's state of one quote the actor may see (404 otherwise). */
export async function quoteLinkState(actor: Actor, quoteId: string, now = new Date()): Promise<LinkState> {
	if (!z.uuid().safeParse(quoteId).success) throw new NotFoundError('Quote');
	const q = await Quote.findOne({ where: { id: quoteId, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } } });
	if (!q) throw new NotFoundError('Quote');
	const job = await Job.findOne({ where: { id: q.jobId, workshopId: actor.workshopId } });
	if (!job || !seesJob(actor, job)) throw new NotFoundError('Quote');
	return latestLinkState(await linksOfQuotes(actor, [q.id]), now);
}
