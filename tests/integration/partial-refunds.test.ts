/**
 * Partial refunds, fresh quote links and the payments list, through the built app's own
 * endpoints and the local fake provider: several partial refunds of one card payment adding
 * up to the whole and never more (refused by the app, and by the fake as the provider
 * documents), cash refunds recorded, the provider's `charge.refunded` webhooks applied once
 * and forward only (a replay and an older figure change nothing), refunded and kept amounts
 * on the job page, the payments list and the totals; a quote whose link ran out shown as
 * such, a fresh link opening while the old one is refused; the payments list sorted by
 * each column and paged.
 *
 * Prices are invented. The refund arithmetic is worked by hand beside each check, in minor
 * units (pence): 15629 = £156.29 is the quote of quotes-payments.test.ts (48.99 + 36.25 +
 * 45.00 = 130.24 net, 20 % tax 26.05). The provider's refund rules are those of its API
 * reference for "Create a refund" (partial refunds until the whole charge is refunded, then
 * an error; never more than what is left; `amount` defaults to all that is left; the charge's
 * `amount_refunded` is cumulative and `refunded` true once in full); the error codes
 * `amount_too_large` and `charge_already_refunded` are written from memory.
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { FAKE_KEY, FAKE_WEBHOOK_SECRET } from '../../scripts/lib/pay';
import { db } from '../../src/lib/server/db';
import { askCardPayment, paymentTotals, recordManualPayment } from '../../src/lib/server/payments/service';
import { addPriceItem, savePricing } from '../../src/lib/server/quotes/pricing';
import { answerQuoteLink, makeQuoteLink } from '../../src/lib/server/quotes/links';
import { jobs } from '../../src/lib/server/services/jobs';
import { makeWorkshop } from '../helpers/fixtures';
import type { Client } from '../helpers/http';
import { signedIn } from '../helpers/records';
import { create, push } from '../helpers/sync';

const base = inject('baseURL');
const payURL = inject('payURL');
Object.assign(process.env, { STRIPE_SECRET_KEY: FAKE_KEY, STRIPE_WEBHOOK_SECRET: FAKE_WEBHOOK_SECRET, PAY_FAKE_URL: payURL });

type Ws = Awaited<ReturnType<typeof makeWorkshop>>;
let ws: Ws;
let other: Ws;
let tech: Client;
let lead: Client;
let otherLead: Client;
let coilId: string;
let fitId: string;
const urls = { successUrl: `${base}/done`, cancelUrl: `${base}/cancel` };

async function technicianJob(w: Ws = ws) {
	return (await jobs.create(w.users.lead.actor, { complaint: 'Misfire under load', assigneeId: w.users.technician.id, status: 'testing' })) as { id: string };
}
async function phoneQuote(jobId: string) {
	const c = create('quote', {
		jobId,
		request: { parts: [{ itemId: coilId, quantityMilli: 1000 }], labour: [{ itemId: fitId, hoursMilli: 500 }], diagnostic: true }
	});
	const [r] = await push(tech, uuidv7(), [c]);
	expect(r.status).toBe('applied');
	return c.entityId;
}
async function approvedJob() {
	const job = await technicianJob();
	const quoteId = await phoneQuote(job.id);
	const link = await makeQuoteLink(ws.users.lead.actor, quoteId, base);
	await answerQuoteLink(link.token, { decision: 'approved', name: 'Robin Ashgrove' });
	return { job, quoteId, link };
}
const row = async (id: string) => {
	const [r] = await db().query<{ state: string; refunded_minor: number | string; provider_payment: string }>(
		'SELECT state, refunded_minor, provider_payment FROM payments WHERE id = ?',
		{ replacements: [id], type: QueryTypes.SELECT }
	);
	return { state: r.state, refunded: Number(r.refunded_minor), ref: r.provider_payment };
};
async function waitFor<T>(fn: () => Promise<T>, ok: (v: T) => boolean, ms = 8000): Promise<T> {
	const end = Date.now() + ms;
	let v = await fn();
	while (!ok(v) && Date.now() < end) {
		await new Promise((r) => setTimeout(r, 100));
		v = await fn();
	}
	return v;
}
const fake = (path: string, body?: unknown) =>
	fetch(payURL + path, body === undefined ? {} : { method: 'POST', body: JSON.stringify(body) }).then((r) => r.json());
type FakeEvent = { id: string; type: string; status: number | null };
const events = async () => (await fake('/_fake/events')) as FakeEvent[];
/** The provider's refund endpoint called directly (as the SDK would), with our test key. */
const providerRefund = (fields: Record<string, string>, key?: string) =>
	fetch(`${payURL}/v1/refunds`, {
		method: 'POST',
		headers: { authorization: `Bearer ${FAKE_KEY}`, 'content-type': 'application/x-www-form-urlencoded', ...(key ? { 'idempotency-key': key } : {}) },
		body: new URLSearchParams(fields)
	});

/** A card payment of the approved quote, paid with the fake's good test card. */
async function paidCard() {
	const { job, quoteId, link } = await approvedJob();
	const p = await askCardPayment(ws.users.technician.actor, job.id, 'quote', urls);
	const r = await fetch(p.url, { method: 'POST', body: new URLSearchParams({ card: '4242 4242 4242 4242' }), redirect: 'manual' });
	expect(r.status).toBe(303);
	const paid = await waitFor(() => row(p.paymentId), (x) => x.state === 'paid' && Boolean(x.ref));
	expect(paid.state).toBe('paid');
	return { job, quoteId, link, paymentId: p.paymentId, ref: paid.ref };
}
const refund = (c: Client, paymentId: string, amount: string, reason?: string) =>
	c.json('POST', `/api/payments/${paymentId}/refund`, { amount, ...(reason ? { reason } : {}) });

beforeAll(async () => {
	ws = await makeWorkshop('Refunds');
	other = await makeWorkshop('Refunds other');
	tech = await signedIn(ws, 'technician');
	lead = await signedIn(ws, 'lead');
	otherLead = await signedIn(other, 'lead');
	// Invented prices: 20 % tax, labour 72.50 an hour, diagnosis 45.00, a coil at 48.99.
	await savePricing(ws.users.lead.actor, { currency: 'GBP', taxRateBp: 2000, labourRateMinor: 7250, diagnosticFeeMinor: 4500 });
	coilId = await addPriceItem(ws.users.lead.actor, { kind: 'part', partNumber: 'FB-CP-2001', label: 'Ignition coil FB-CP-2001', priceMinor: 4899 });
	fitId = await addPriceItem(ws.users.lead.actor, { kind: 'labour', label: 'Fit one coil', priceMinor: 7250, hoursMilli: 500 });
});

describe('partial refunds of a card payment', () => {
	it('adds several partial refunds up to the whole, refuses more, and shows refunded and kept amounts', async () => {
		const before = await paymentTotals(ws.workshop.id);
		const { job, paymentId, link } = await paidCard();

		// Only leads and owners (the rulebook), only in the payment's own workshop.
		expect((await refund(tech, paymentId, '10.00')).status).toBe(403);
		expect((await refund(otherLead, paymentId, '10.00')).status).toBe(404);
		// Amounts that are not money in GBP are refused with the field named.
		for (const bad of ['', 'ten', '12.345', '0', '-5']) {
			const r = await refund(lead, paymentId, bad);
			expect(r.status, bad).toBe(400);
			expect(Object.keys((await r.json()).error.fields)).toContain('amount');
		}

		// 1st: £50.00 = 5000. Left 15629 − 5000 = 10629 (£106.29).
		expect((await refund(lead, paymentId, '50', 'Coil supplied by the customer')).status).toBe(201);
		expect(await row(paymentId)).toMatchObject({ state: 'paid', refunded: 5000 });
		// 2nd: £25.25 = 2525. Refunded 5000 + 2525 = 7525; left 15629 − 7525 = 8104 (£81.04).
		expect((await refund(lead, paymentId, '£25.25')).status).toBe(201);
		expect(await row(paymentId)).toMatchObject({ state: 'paid', refunded: 7525 });
		// £81.05 is one penny more than what is left: refused, nothing changes.
		const over = await refund(lead, paymentId, '81.05');
		expect(over.status).toBe(400);
		expect((await over.json()).error.fields.amount).toBe('At most £81.04: that is what is left to refund');
		expect(await row(paymentId)).toMatchObject({ refunded: 7525 });

		// The job page shows what was refunded and what is kept.
		const page = await (await lead.get(`/jobs/${job.id}/money`, 'text/html')).text();
		expect(page).toContain('Refunded £75.25 · kept £81.04');
		expect(page).toContain('(Coil supplied by the customer)');
		expect(page).toContain('at most £81.04');
		// The customer's own page says what they paid and had back.
		const q = await (await fetch(link.url)).text();
		expect(q).toContain('You paid £156.29; the workshop refunded £75.25, so you paid £81.04 in the end.');
		// Totals: received +15629, refunded +7525, kept +8104 (15629 − 7525).
		const mid = await paymentTotals(ws.workshop.id);
		const gbp = (t: typeof mid) => t.paid.find((x) => x.currency === 'GBP') ?? { receivedMinor: 0, refundedMinor: 0, totalMinor: 0 };
		expect(gbp(mid).receivedMinor - gbp(before).receivedMinor).toBe(15629);
		expect(gbp(mid).refundedMinor - gbp(before).refundedMinor).toBe(7525);
		expect(gbp(mid).totalMinor - gbp(before).totalMinor).toBe(8104);

		// 3rd: the last £81.04 (8104) through the form: 5000 + 2525 + 8104 = 15629, refunded in full.
		const form = await lead.form(`/jobs/${job.id}/money?/refund`, { paymentId, amount: '81.04', reason: '' });
		expect(form.status).toBeLessThan(400);
		expect(await row(paymentId)).toMatchObject({ state: 'refunded', refunded: 15629 });
		const done = await db().query<{ amount_minor: number | string; state: string }>(
			'SELECT amount_minor, state FROM payment_refunds WHERE payment_id = ? ORDER BY created_at, id',
			{ replacements: [paymentId], type: QueryTypes.SELECT }
		);
		expect(done.map((d) => [Number(d.amount_minor), d.state])).toEqual([[5000, 'done'], [2525, 'done'], [8104, 'done']]);
		// Nothing is left: another refund is refused.
		expect((await refund(lead, paymentId, '0.01')).status).toBe(403);
	});

	it('ignores a replayed refund webhook and an older refunded figure arriving late', async () => {
		const { paymentId } = await paidCard();
		await fake('/_fake/hold', { hold: true });
		try {
			// £10.00 then £20.00: the provider's cumulative figures are 1000 then 3000.
			expect((await refund(lead, paymentId, '10.00')).status).toBe(201);
			expect((await refund(lead, paymentId, '20.00')).status).toBe(201);
		} finally {
			await fake('/_fake/hold', { hold: false });
		}
		const [first, second] = (await events()).filter((e) => e.type === 'charge.refunded').slice(-2);
		// The newer figure first, then the older one: forward only, the older is stale.
		expect((await fake('/_fake/deliver', { id: second.id })).status).toBe(200);
		expect((await fake('/_fake/deliver', { id: first.id })).status).toBe(200);
		// The same event again: a duplicate, nothing changes.
		expect((await fake('/_fake/deliver', { id: second.id })).status).toBe(200);
		const outcomes = await db().query<{ event_id: string; outcome: string }>(
			'SELECT event_id, outcome FROM payment_events WHERE event_id IN (?)',
			{ replacements: [[first.id, second.id]], type: QueryTypes.SELECT }
		);
		const byId = Object.fromEntries(outcomes.map((o) => [o.event_id, o.outcome]));
		// The app's own refunds had already recorded 3000, so neither figure moves it.
		expect([byId[second.id], byId[first.id]]).toEqual(['stale', 'stale']);
		expect(await row(paymentId)).toMatchObject({ state: 'paid', refunded: 3000 });
		const [{ n }] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM payment_events WHERE event_id = ?', {
			replacements: [second.id],
			type: QueryTypes.SELECT
		});
		expect(Number(n)).toBe(1);
	});

	it('takes a refund made at the provider itself from its webhook, forward only', async () => {
		const { paymentId, ref } = await paidCard();
		// £40.00 refunded outside the app: the charge's cumulative amount_refunded is 4000.
		const r = await providerRefund({ payment_intent: ref, amount: '4000' });
		expect(r.status).toBe(200);
		expect(await waitFor(() => row(paymentId), (x) => x.refunded === 4000)).toMatchObject({ state: 'paid', refunded: 4000 });
		// The app counts it: what is left is 15629 − 4000 = 11629 (£116.29).
		const over = await refund(lead, paymentId, '116.30');
		expect((await over.json()).error.fields.amount).toBe('At most £116.29: that is what is left to refund');
	});
});

describe('a refund the provider refuses', () => {
	it('says so, records it as not made, and changes no total', async () => {
		const { paymentId, ref } = await paidCard();
		await fake('/_fake/hold', { hold: true });
		try {
			// 150.00 (15000) refunded at the provider while its webhook is held: the app still
			// believes 156.29 is left, the provider only 15629 − 15000 = 629 (6.29).
			expect((await providerRefund({ payment_intent: ref, amount: '15000' })).status).toBe(200);
			const r = await refund(lead, paymentId, '10.00');
			expect(r.status).toBe(502);
			expect((await r.json()).error.message).toMatch(/^The card provider did not refund it: Refund amount \(£10\.00\) is greater than unrefunded amount on charge \(£6\.29\)/);
		} finally {
			await fake('/_fake/hold', { hold: false });
		}
		expect(await row(paymentId)).toMatchObject({ state: 'paid', refunded: 0 });
		const [made] = await db().query<{ state: string; amount_minor: number | string }>('SELECT state, amount_minor FROM payment_refunds WHERE payment_id = ?', {
			replacements: [paymentId],
			type: QueryTypes.SELECT
		});
		expect([made.state, Number(made.amount_minor)]).toEqual(['failed', 1000]);
		// The held event arrives: 15000 refunded; 629 is left, and 6.29 is then accepted in full.
		const held = (await events()).filter((e) => e.type === 'charge.refunded').at(-1)!;
		expect((await fake('/_fake/deliver', { id: held.id })).status).toBe(200);
		expect(await row(paymentId)).toMatchObject({ state: 'paid', refunded: 15000 });
		expect((await refund(lead, paymentId, '6.29')).status).toBe(201);
		expect(await row(paymentId)).toMatchObject({ state: 'refunded', refunded: 15629 });
	});
});

describe('the fake provider’s refund endpoint', () => {
	it('refunds in parts, defaults to what is left, refuses more, and replays an idempotent request', async () => {
		const { ref } = await paidCard();
		const a = await providerRefund({ payment_intent: ref, amount: '629' }, 'k-one');
		const aBody = await a.json();
		expect([a.status, aBody.amount, aBody.status, aBody.object]).toEqual([200, 629, 'succeeded', 'refund']);
		// The same key and parameters: the first answer again, no second refund.
		const again = await (await providerRefund({ payment_intent: ref, amount: '629' }, 'k-one')).json();
		expect(again.id).toBe(aBody.id);
		// The same key with other parameters is an error.
		expect((await providerRefund({ payment_intent: ref, amount: '1' }, 'k-one')).status).toBe(400);
		// Left: 15629 − 629 = 15000; 15001 is too much.
		const tooMuch = await providerRefund({ payment_intent: ref, amount: '15001' });
		expect([tooMuch.status, (await tooMuch.json()).error.code]).toEqual([400, 'amount_too_large']);
		// No amount: all that is left (15000), and the charge is refunded in full.
		const rest = await (await providerRefund({ payment_intent: ref })).json();
		expect(rest.amount).toBe(15000);
		const full = await providerRefund({ payment_intent: ref, amount: '1' });
		expect([full.status, (await full.json()).error.code]).toEqual([400, 'charge_already_refunded']);
		const bad = await providerRefund({ payment_intent: ref, amount: '0' });
		expect(bad.status).toBe(400);
	});
});

describe('refunds of cash and bank transfers', () => {
	it('records a partial cash refund without the provider', async () => {
		const job = await technicianJob();
		// The diagnostic fee with tax: 4500 + 900 = 5400 (£54.00).
		const cash = await recordManualPayment(ws.users.technician.actor, job.id, { purpose: 'diagnostic', method: 'cash' });
		const sent = (await events()).length;
		expect((await refund(lead, cash.paymentId, '10', 'Part of the fee waived')).status).toBe(201);
		// 5400 − 1000 = 4400 left.
		expect(await row(cash.paymentId)).toMatchObject({ state: 'paid', refunded: 1000 });
		expect((await events()).length).toBe(sent);
		const over = await refund(lead, cash.paymentId, '44.01');
		expect((await over.json()).error.fields.amount).toBe('At most £44.00: that is what is left to refund');
		// An owner may refund too: the last 44.00 (4400), 1000 + 4400 = 5400 in full.
		expect((await refund(await signedIn(ws, 'owner'), cash.paymentId, '44.00')).status).toBe(201);
		expect(await row(cash.paymentId)).toMatchObject({ state: 'refunded', refunded: 5400 });
	});
});

describe('a quote whose link ran out', () => {
	it('shows the expiry plainly, and a fresh link opens while the old ones are refused', async () => {
		const job = await technicianJob();
		const quoteId = await phoneQuote(job.id);
		const old = await makeQuoteLink(ws.users.lead.actor, quoteId, base, {}, new Date(Date.now() - 8 * 86_400_000));
		const state = await (await tech.get(`/api/quotes/${quoteId}/link`)).json();
		expect(state.latest.expired).toBe(true);
		expect((await otherLead.get(`/api/quotes/${quoteId}/link`)).status).toBe(404);
		const page = await (await lead.get(`/jobs/${job.id}/money`, 'text/html')).text();
		expect(page).toContain('The approval link has expired');
		expect(page).toContain('Make a fresh link for the customer');

		const fresh = await (await tech.json('POST', `/api/quotes/${quoteId}/link`, {})).json();
		expect((await (await tech.get(`/api/quotes/${quoteId}/link`)).json()).latest.expired).toBe(false);
		expect((await fetch(fresh.url)).status).toBe(200);
		expect((await fetch(old.url)).status).toBe(410);
		expect(await (await lead.get(`/jobs/${job.id}/money`, 'text/html')).text()).not.toContain('The approval link has expired');

		// A still-open link is retired by a newer one: refused with its own words.
		const newer = await (await tech.json('POST', `/api/quotes/${quoteId}/link`, {})).json();
		const retired = await fetch(fresh.url);
		expect(retired.status).toBe(410);
		expect(await retired.text()).toContain('This quote link has been replaced');
		const token = (u: string) => u.split('/q/')[1];
		await expect(answerQuoteLink(token(fresh.url), { decision: 'approved', name: 'Robin Ashgrove' })).rejects.toMatchObject({ status: 410 });
		await answerQuoteLink(token(newer.url), { decision: 'approved', name: 'Robin Ashgrove' });
		expect((await (await tech.get(`/api/quotes/${quoteId}/link`)).json()).latest).toMatchObject({ expired: false, answered: true });
	});
});

describe('the payments list', () => {
	it('sorts by each column and pages without losing or repeating a payment', async () => {
		const w = await makeWorkshop('Refunds list');
		await savePricing(w.users.lead.actor, { currency: 'GBP', taxRateBp: 2000, labourRateMinor: 7250, diagnosticFeeMinor: 4500 });
		const c = await signedIn(w, 'lead');
		const empty = await (await c.get('/api/payments')).json();
		expect([empty.total, empty.items]).toEqual([0, []]);
		const ids: string[] = [];
		for (let i = 0; i < 5; i++) {
			const job = (await jobs.create(w.users.lead.actor, { complaint: `No start ${i}`, status: 'testing' })) as { id: string };
			const p = await recordManualPayment(w.users.lead.actor, job.id, { purpose: 'diagnostic', method: i % 2 ? 'transfer' : 'cash' });
			ids.push(p.paymentId);
		}
		// Refund 1.00, 2.00, 3.00 of three of them (100, 200, 300).
		for (const [i, amount] of [[0, '1'], [2, '2'], [4, '3']] as const) expect((await refund(c, ids[i], amount)).status).toBe(201);

		for (const key of ['when', 'job', 'purpose', 'method', 'amount', 'refunded', 'state', 'by']) {
			for (const sort of [key, `-${key}`]) {
				const seen: { id: string; refundedMinor: number; jobNumber: number; method: string }[] = [];
				for (let page = 1; page <= 3; page++) {
					const r = await c.get(`/api/payments?sort=${sort}&pageSize=2&page=${page}`);
					expect(r.status, sort).toBe(200);
					const body = await r.json();
					expect(body.total).toBe(5);
					seen.push(...body.items);
				}
				expect(new Set(seen.map((s) => s.id)).size, sort).toBe(5);
				if (key === 'refunded') {
					const want = [0, 0, 100, 200, 300];
					expect(seen.map((s) => s.refundedMinor)).toEqual(sort.startsWith('-') ? [...want].reverse() : want);
				}
				if (key === 'job') {
					const nums = seen.map((s) => s.jobNumber);
					const sorted = [...nums].sort((a, b) => a - b);
					expect(nums).toEqual(sort.startsWith('-') ? sorted.reverse() : sorted);
				}
				if (key === 'method') {
					// "cash" before "transfer" (the column's stored order), 3 cash and 2 transfers.
					const want = ['cash', 'cash', 'cash', 'transfer', 'transfer'];
					expect(seen.map((s) => s.method)).toEqual(sort.startsWith('-') ? [...want].reverse() : want);
				}
			}
		}
		expect((await c.get('/api/payments?sort=colour')).status).toBe(400);
		expect((await c.get('/api/payments?pageSize=101')).status).toBe(400);
		expect((await signedIn(w, 'technician').then((t) => t.get('/api/payments'))).status).toBe(403);
	});
});
