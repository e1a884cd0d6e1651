/**
 * Quotes, the customer's answer by link and payments through the local fake provider, end
 * to end through the built app: a quote made by a phone's sync push and priced by the
 * server (never from the client's figures), the job's status following the answer, the
 * approval page's refusals (expired 410, already answered 409, a link whose quote is not in
 * its workshop 404), a verbal approval marked as such; card payments through the fake
 * (paid, declined, the same webhook twice, out of order, a wrong signature refused), refunds
 * by leads only, cash recorded by hand, and the overview's totals.
 *
 * Prices are invented; the tax arithmetic is checked against decimal.js in
 * tests/unit/money/money.test.ts, and here the expected totals are worked by hand beside each check.
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { FAKE_KEY, FAKE_WEBHOOK_SECRET } from '../../scripts/lib/pay';
import { db } from '../../src/lib/server/db';
import { Job, Quote } from '../../src/lib/server/db/models';
import { askCardPayment, paymentTotals, recordManualPayment, refundPayment } from '../../src/lib/server/payments/service';
import { addPriceItem, savePricing } from '../../src/lib/server/quotes/pricing';
import { answerQuoteLink, makeQuoteLink, openQuoteLink } from '../../src/lib/server/quotes/links';
import { jobs } from '../../src/lib/server/services/jobs';
import { makeWorkshop } from '../helpers/fixtures';
import type { Client } from '../helpers/http';
import { signedIn } from '../helpers/records';
import { create, op, push } from '../helpers/sync';

const base = inject('baseURL');
const payURL = inject('payURL');
Object.assign(process.env, { STRIPE_SECRET_KEY: FAKE_KEY, STRIPE_WEBHOOK_SECRET: FAKE_WEBHOOK_SECRET, PAY_FAKE_URL: payURL });

type Ws = Awaited<ReturnType<typeof makeWorkshop>>;
let ws: Ws;
let other: Ws;
let tech: Client;
let coilId: string;
let fitId: string;

const GOOD = '4242 4242 4242 4242';
const DECLINED = '4000 0000 0000 0002';

async function technicianJob(w: Ws = ws) {
	return (await jobs.create(w.users.lead.actor, { complaint: 'Misfire under load', assigneeId: w.users.technician.id, status: 'testing' })) as { id: string };
}

/** A quote made by the technician's phone: the coil, 0.5 h fitting, the diagnostic fee. */
async function phoneQuote(jobId: string, extra: Record<string, unknown> = {}) {
	const c = create('quote', {
		jobId,
		request: { parts: [{ itemId: coilId, quantityMilli: 1000 }], labour: [{ itemId: fitId, hoursMilli: 500 }], diagnostic: true },
		...extra
	});
	const [r] = await push(tech, uuidv7(), [c]);
	expect(r.status).toBe('applied');
	return c.entityId;
}

const jobStatus = async (id: string) => (await Job.findByPk(id))!.status;
const paymentState = async (id: string) => {
	const [r] = await db().query<{ state: string }>('SELECT state FROM payments WHERE id = ?', { replacements: [id], type: QueryTypes.SELECT });
	return r?.state;
};
async function waitFor(fn: () => Promise<unknown>, want: unknown, ms = 8000) {
	const end = Date.now() + ms;
	let v: unknown;
	while (Date.now() < end) {
		v = await fn();
		if (v === want) return v;
		await new Promise((r) => setTimeout(r, 100));
	}
	return v;
}
async function payOnFake(url: string, card: string) {
	return fetch(url, { method: 'POST', body: new URLSearchParams({ card }), redirect: 'manual' });
}
const fake = (path: string, body?: unknown) =>
	fetch(payURL + path, body === undefined ? {} : { method: 'POST', body: JSON.stringify(body) }).then((r) => r.json());
async function lastEvent(type: string) {
	const list = (await fake('/_fake/events')) as { id: string; type: string; status: number | null }[];
	return list.filter((e) => e.type === type).at(-1)!;
}

beforeAll(async () => {
	ws = await makeWorkshop('Quotes');
	other = await makeWorkshop('Quotes other');
	tech = await signedIn(ws, 'technician');
	// Invented prices: 20 % tax, labour 72.50 an hour, diagnosis 45.00, a coil at 48.99.
	await savePricing(ws.users.lead.actor, { currency: 'GBP', taxRateBp: 2000, labourRateMinor: 7250, diagnosticFeeMinor: 4500 });
	coilId = await addPriceItem(ws.users.lead.actor, { kind: 'part', partNumber: 'FB-CP-1001', label: 'Ignition coil FB-CP-1001', priceMinor: 4899 });
	fitId = await addPriceItem(ws.users.lead.actor, { kind: 'labour', label: 'Fit one coil', priceMinor: 7250, hoursMilli: 500 });
	await savePricing(other.users.lead.actor, { currency: 'EUR', taxRateBp: 1900, labourRateMinor: 6000, diagnosticFeeMinor: 3900 });
});

describe('pricing and quotes', () => {
	it('lets only leads and owners set prices', async () => {
		await expect(savePricing(ws.users.technician.actor, { currency: 'GBP', taxRateBp: 0, labourRateMinor: 1, diagnosticFeeMinor: 1 })).rejects.toMatchObject({ status: 403 });
		await expect(addPriceItem(ws.users.apprentice.actor, { kind: 'part', partNumber: 'X', label: 'X', priceMinor: 1 })).rejects.toMatchObject({ status: 403 });
	});

	it('prices a phone’s quote on the server, ignoring figures the phone sends, and moves the job to awaiting authorisation', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id, { totalMinor: 1, currency: 'JPY', state: 'approved' });
		const q = (await Quote.findByPk(id))!;
		// 48.99 + 0.5 × 72.50 (36.25) + 45.00 = 130.24; 20 % tax 26.048 → 26.05; total 156.29 (worked by hand).
		expect([q.netMinor, q.taxMinor, q.totalMinor, q.currency, q.state]).toEqual([13024, 2605, 15629, 'GBP', 'draft']);
		expect(q.statusBefore).toBe('testing');
		expect(await jobStatus(job.id)).toBe('awaiting_authorisation');
	});

	it('refuses an item that is not on the workshop’s own list', async () => {
		const job = await technicianJob();
		const c = create('quote', { jobId: job.id, request: { parts: [{ itemId: uuidv7(), quantityMilli: 1000 }] } });
		const [r] = await push(tech, uuidv7(), [c]);
		expect(r.status).toBe('rejected');
		expect(r.reason).toBe('invalid');
	});

	it('records a verbal approval marked as such, with who recorded it', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const q = (await Quote.findByPk(id))!;
		const [r] = await push(tech, uuidv7(), [op('quote', 'patch', id, { verbalDecision: 'approved', verbalName: 'Dana Fieldhouse', verbalHow: 'In person on the driveway' }, q.version)]);
		expect(r.status).toBe('applied');
		const after = (await Quote.findByPk(id))!;
		expect([after.state, after.answeredVia, after.answeredName, after.answeredBy]).toEqual(['approved', 'verbal', 'Dana Fieldhouse', ws.users.technician.id]);
		expect(await jobStatus(job.id)).toBe('awaiting_parts');
	});

	it('refuses a verbal answer without the customer’s name', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const q = (await Quote.findByPk(id))!;
		const [r] = await push(tech, uuidv7(), [op('quote', 'patch', id, { verbalDecision: 'approved' }, q.version)]);
		expect([r.status, r.reason]).toEqual(['rejected', 'invalid']);
	});
});

describe('the approval page', () => {
	it('takes the customer’s answer once, keeps the exact quote shown, and moves the job', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const link = await makeQuoteLink(ws.users.technician.actor, id, base);
		expect((await Quote.findByPk(id))!.state).toBe('sent');
		const page = await fetch(link.url);
		expect(page.status).toBe(200);
		const html = await page.text();
		expect(html).toContain('£156.29');
		expect(html).toContain('Ignition coil FB-CP-1001');
		await answerQuoteLink(link.token, { decision: 'approved', name: 'Robin Ashgrove' });
		const q = (await Quote.findByPk(id))!;
		expect([q.state, q.answeredVia, q.answeredName]).toEqual(['approved', 'link', 'Robin Ashgrove']);
		expect(await jobStatus(job.id)).toBe('awaiting_parts');
		const [kept] = await db().query<{ shown: string; typed_name: string }>('SELECT shown, typed_name FROM quote_links WHERE quote_id = ?', { replacements: [id], type: QueryTypes.SELECT });
		expect(JSON.parse(kept.shown).totalMinor).toBe(15629);
		expect(kept.typed_name).toBe('Robin Ashgrove');
		// Already answered: no second answer (409), the page shows the first.
		await expect(answerQuoteLink(link.token, { decision: 'declined', name: 'Robin Ashgrove' })).rejects.toMatchObject({ status: 409 });
		expect((await openQuoteLink(link.token)).answer?.decision).toBe('approved');
	});

	it('puts the job back where it was when the customer declines', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const link = await makeQuoteLink(ws.users.lead.actor, id, base);
		const r = await fetch(`${base}/q/${link.token}?/answer`, {
			method: 'POST',
			headers: { origin: base, 'content-type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams({ decision: 'declined', name: 'Sam Lowbank' })
		});
		expect(r.status).toBe(200);
		expect((await Quote.findByPk(id))!.state).toBe('declined');
		expect(await jobStatus(job.id)).toBe('testing');
	});

	it('answers 410 for an expired link and takes no answer', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const link = await makeQuoteLink(ws.users.lead.actor, id, base, {}, new Date(Date.now() - 8 * 86_400_000));
		expect((await fetch(link.url)).status).toBe(410);
		await expect(answerQuoteLink(link.token, { decision: 'approved', name: 'Late Customer' })).rejects.toMatchObject({ status: 410 });
		expect((await Quote.findByPk(id))!.state).toBe('sent');
	});

	it('answers 404 for an unknown token and for a link whose quote is not in its workshop', async () => {
		expect((await fetch(`${base}/q/${'A'.repeat(43)}`)).status).toBe(404);
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const link = await makeQuoteLink(ws.users.lead.actor, id, base);
		await db().query('UPDATE quote_links SET workshop_id = ? WHERE quote_id = ?', { replacements: [other.workshop.id, id] });
		expect((await fetch(link.url)).status).toBe(404);
		await expect(answerQuoteLink(link.token, { decision: 'approved', name: 'Someone Else' })).rejects.toMatchObject({ status: 404 });
	});

	it('refuses a link to another workshop’s lead', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		await expect(makeQuoteLink(other.users.lead.actor, id, base)).rejects.toMatchObject({ status: 404 });
	});

	it('asks for the customer’s name', async () => {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const link = await makeQuoteLink(ws.users.lead.actor, id, base);
		await expect(answerQuoteLink(link.token, { decision: 'approved', name: ' ' })).rejects.toMatchObject({ status: 400 });
	});
});

describe('payments through the fake provider', () => {
	async function approvedJob() {
		const job = await technicianJob();
		const id = await phoneQuote(job.id);
		const link = await makeQuoteLink(ws.users.lead.actor, id, base);
		await answerQuoteLink(link.token, { decision: 'approved', name: 'Robin Ashgrove' });
		return { job, quoteId: id, link };
	}
	const urls = { successUrl: `${base}/done`, cancelUrl: `${base}/cancel` };

	it('takes the approved quote’s total by the test card, once, whatever the webhook repeats', async () => {
		const { job } = await approvedJob();
		const p = await askCardPayment(ws.users.technician.actor, job.id, 'quote', urls);
		expect([p.amountMinor, p.currency]).toEqual([15629, 'GBP']);
		expect(await paymentState(p.paymentId)).toBe('pending');
		const r = await payOnFake(p.url, GOOD);
		expect(r.status).toBe(303);
		expect(await waitFor(() => paymentState(p.paymentId), 'paid')).toBe('paid');
		const ev = await lastEvent('checkout.session.completed');
		expect(ev.status).toBe(200);
		// The same event again: applied once, nothing changes.
		expect((await fake('/_fake/deliver', { id: ev.id })).status).toBe(200);
		const [{ n }] = await db().query<{ n: number }>(
			`SELECT COUNT(*) AS n FROM audit_log WHERE entity = 'payment' AND entity_id = ? AND field = 'state' AND new_value = '"paid"'`,
			{ replacements: [p.paymentId], type: QueryTypes.SELECT }
		);
		expect(Number(n)).toBe(1);
		const [row] = await db().query<{ outcome: string }>('SELECT outcome FROM payment_events WHERE event_id = ?', { replacements: [ev.id], type: QueryTypes.SELECT });
		expect(row.outcome).toBe('applied');
	});

	it('records a declined card, then the customer pays with another', async () => {
		const { job } = await approvedJob();
		const p = await askCardPayment(ws.users.technician.actor, job.id, 'quote', urls);
		const r = await payOnFake(p.url, DECLINED);
		expect(r.status).toBe(402);
		expect(await waitFor(() => paymentState(p.paymentId), 'failed')).toBe('failed');
		await payOnFake(p.url, GOOD);
		expect(await waitFor(() => paymentState(p.paymentId), 'paid')).toBe('paid');
	});

	it('keeps "paid" when the decline arrives after it (out of order)', async () => {
		const { job } = await approvedJob();
		const p = await askCardPayment(ws.users.technician.actor, job.id, 'quote', urls);
		await fake('/_fake/hold', { hold: true });
		try {
			await payOnFake(p.url, DECLINED);
			await payOnFake(p.url, GOOD);
		} finally {
			await fake('/_fake/hold', { hold: false });
		}
		const failed = await lastEvent('payment_intent.payment_failed');
		const paid = await lastEvent('checkout.session.completed');
		expect((await fake('/_fake/deliver', { id: paid.id })).status).toBe(200);
		expect((await fake('/_fake/deliver', { id: failed.id })).status).toBe(200);
		expect(await paymentState(p.paymentId)).toBe('paid');
		const [row] = await db().query<{ outcome: string }>('SELECT outcome FROM payment_events WHERE event_id = ?', { replacements: [failed.id], type: QueryTypes.SELECT });
		expect(row.outcome).toBe('stale');
	});

	it('refuses a webhook with a wrong signature and changes nothing', async () => {
		const { job } = await approvedJob();
		const p = await askCardPayment(ws.users.technician.actor, job.id, 'quote', urls);
		await fake('/_fake/hold', { hold: true });
		try {
			await payOnFake(p.url, GOOD);
		} finally {
			await fake('/_fake/hold', { hold: false });
		}
		const ev = await lastEvent('checkout.session.completed');
		expect((await fake('/_fake/deliver', { id: ev.id, secret: 'whsec_not_the_workshops' })).status).toBe(400);
		const unsigned = await fetch(`${base}/api/pay/webhook`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' });
		expect(unsigned.status).toBe(400);
		expect(await paymentState(p.paymentId)).toBe('pending');
		// Signed rightly, the same event is then taken.
		expect((await fake('/_fake/deliver', { id: ev.id })).status).toBe(200);
		expect(await paymentState(p.paymentId)).toBe('paid');
	});

	it('lets leads and owners refund, through the provider, and no one else', async () => {
		const { job } = await approvedJob();
		const p = await askCardPayment(ws.users.technician.actor, job.id, 'quote', urls);
		await payOnFake(p.url, GOOD);
		expect(await waitFor(() => paymentState(p.paymentId), 'paid')).toBe('paid');
		// The whole 156.29 (15629): refunded in full.
		await expect(refundPayment(ws.users.technician.actor, p.paymentId, { amount: '156.29' })).rejects.toMatchObject({ status: 403 });
		await expect(refundPayment(other.users.lead.actor, p.paymentId, { amount: '156.29' })).rejects.toMatchObject({ status: 404 });
		await refundPayment(ws.users.lead.actor, p.paymentId, { amount: '156.29' });
		expect(await paymentState(p.paymentId)).toBe('refunded');
		const ev = await lastEvent('charge.refunded');
		expect(await waitFor(async () => (await fake('/_fake/events')).find((e: { id: string }) => e.id === ev.id)?.status, 200)).toBe(200);
		await expect(refundPayment(ws.users.owner.actor, p.paymentId, { amount: '0.01' })).rejects.toMatchObject({ status: 403 });
	});

	it('records cash by hand for the diagnostic fee with tax, and counts paid and outstanding totals', async () => {
		const before = await paymentTotals(ws.workshop.id);
		const job = await technicianJob();
		const cash = await recordManualPayment(ws.users.technician.actor, job.id, { purpose: 'diagnostic', method: 'cash' });
		// 45.00 + 20 % (9.00) = 54.00 (worked by hand).
		expect(cash.amountMinor).toBe(5400);
		const { job: unpaid } = await approvedJob();
		void unpaid;
		const after = await paymentTotals(ws.workshop.id);
		const sumOf = (l: { currency: string; totalMinor: number }[]) => l.find((x) => x.currency === 'GBP')?.totalMinor ?? 0;
		expect(sumOf(after.paid) - sumOf(before.paid)).toBe(5400);
		expect(sumOf(after.outstanding) - sumOf(before.outstanding)).toBe(15629);
	});

	it('refuses a card payment when no quote is approved', async () => {
		const job = await technicianJob();
		await expect(askCardPayment(ws.users.technician.actor, job.id, 'quote', urls)).rejects.toMatchObject({ status: 400 });
	});
});
