/**
 * The local fake payment provider (development, demo and tests only): the few endpoints of
 * the provider's API that Fieldbench's SDK calls, on 127.0.0.1, in memory. Nothing leaves the
 * machine; no real card is ever charged. Started and stopped by scripts/lib/pay.ts, like the
 * private MariaDB and the fake mail server.
 *
 *   node scripts/fake-pay.js --port 12111 --key sk_test_… --webhook-secret whsec_… --webhook-url http://127.0.0.1:5173/api/pay/webhook
 *
 * API (form-encoded requests, JSON answers, `Authorization: Bearer <key>` must match --key):
 *   POST /v1/checkout/sessions               a hosted payment page for one amount
 *   GET  /v1/checkout/sessions/:id           the session
 *   POST /v1/checkout/sessions/:id/expire    close it unpaid (sends checkout.session.expired)
 *   POST /v1/refunds                         refund part or all of what is left of a paid session's
 *                                            payment (`amount` in minor units, default all that is
 *                                            left; over-refund and a refunded charge are errors;
 *                                            `Idempotency-Key` replays the first answer); sends
 *                                            charge.refunded with the cumulative amount_refunded
 * The hosted page, on the fake's own origin (so card numbers never reach the app):
 *   GET  /pay/:id    the amount and a card form
 *   POST /pay/:id    card=4242 4242 4242 4242 pays (checkout.session.completed, then back to
 *                    success_url); card=4000 0000 0000 0002 is declined
 *                    (payment_intent.payment_failed; the page says so and lets the customer try
 *                    again); any other number is refused as not a test card.
 * Webhooks: every event is POSTed as JSON to --webhook-url, signed with --webhook-secret in the
 * provider's `Stripe-Signature` scheme (the SDK's own test-header helper makes it).
 * Test controls (not part of the provider's API):
 *   GET  /_fake/events            every event made: id, type, last delivery status
 *   POST /_fake/hold  {hold}      keep events instead of sending them (to send them out of order)
 *   POST /_fake/deliver {id, secret?}  send a kept or sent event (again); `secret` signs it with
 *                                 another secret, to see the app refuse it; answers {status}
 */
import { randomBytes } from 'node:crypto';
import http from 'node:http';
import Stripe from 'stripe';

const arg = (name, fallback) => {
	const i = process.argv.indexOf(`--${name}`);
	return i > 0 ? process.argv[i + 1] : fallback;
};
const port = Number(arg('port', '12111'));
const KEY = arg('key', 'sk_test_fieldbench_local');
const SECRET = arg('webhook-secret', 'whsec_fieldbench_local');
let webhookUrl = arg('webhook-url', '');
const base = `http://127.0.0.1:${port}`;
const signer = new Stripe(KEY);

const GOOD = '4242424242424242';
const DECLINED = '4000000000000002';

/** @type {Map<string, any>} */
const sessions = new Map();
/** @type {{ id: string, type: string, body: string, status: number | null }[]} */
const events = [];
let hold = false;
/** Answers kept by idempotency key (a repeated request gets the first answer again). */
/** @type {Map<string, { body: string, status: number, answer: unknown }>} */
const idempotent = new Map();

const rid = (prefix) => `${prefix}_${randomBytes(12).toString('hex')}`;
const now = () => Math.floor(Date.now() / 1000);

async function deliver(ev, secret = SECRET) {
	if (!webhookUrl) return null;
	const header = signer.webhooks.generateTestHeaderString({ payload: ev.body, secret });
	try {
		const r = await fetch(webhookUrl, {
			method: 'POST',
			headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': header },
			body: ev.body
		});
		ev.status = r.status;
		return r.status;
	} catch {
		ev.status = 0;
		return 0;
	}
}

async function emit(type, object) {
	// Events carry a creation time; a held event keeps the time it was made.
	const ev = { id: rid('evt'), type, status: null, body: '' };
	ev.body = JSON.stringify({ id: ev.id, object: 'event', type, created: now(), livemode: false, data: { object } });
	events.push(ev);
	if (!hold) await deliver(ev);
	return ev;
}

const json = (res, status, body) => {
	res.writeHead(status, { 'content-type': 'application/json' });
	res.end(JSON.stringify(body));
};
const apiError = (res, status, message, type = 'invalid_request_error') => json(res, status, { error: { type, message } });

function readBody(req) {
	return new Promise((resolve) => {
		const chunks = [];
		req.on('data', (c) => chunks.push(c));
		req.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
	});
}

const esc = (s) => String(s).replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
const money = (minor, currency) =>
	new Intl.NumberFormat('en-GB', { style: 'currency', currency: currency.toUpperCase() }).format(minor / 100);

function page(s, message = '') {
	const paid = s.payment_status === 'paid';
	return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>Test payment — ${esc(money(s.amount_total, s.currency))}</title>
<style>body{font:18px/1.5 system-ui,sans-serif;margin:0 auto;max-width:28rem;padding:1rem;color:#111;background:#fff}
label{display:block;font-weight:600;margin-top:1rem}input{font-size:1.25rem;width:100%;box-sizing:border-box;padding:.75rem;border:2px solid #333;border-radius:.5rem;min-height:3.5rem}
button{font-size:1.25rem;width:100%;min-height:3.5rem;margin-top:1rem;border:0;border-radius:.5rem;background:#0b3d2e;color:#fff;font-weight:700}
.msg{border:2px solid #8a1c1c;color:#8a1c1c;padding:.75rem;border-radius:.5rem}.note{color:#333;font-size:.9rem}</style></head>
<body><main><h1>Test payment</h1>
<p class="note">Local test payment page. No money moves and no card is charged.</p>
<p>${esc(s.description)}</p><p><strong>${esc(money(s.amount_total, s.currency))}</strong></p>
${paid ? '<p role="status">Paid. You can close this page.</p>' : `${message ? `<p class="msg" role="alert">${esc(message)}</p>` : ''}
<form method="post" action="/pay/${esc(s.id)}"><label for="card">Card number</label>
<input id="card" name="card" inputmode="numeric" autocomplete="off" required>
<p class="note">Test cards: 4242 4242 4242 4242 pays; 4000 0000 0000 0002 is declined.</p>
<button type="submit">Pay ${esc(money(s.amount_total, s.currency))}</button></form>`}
</main></body></html>`;
}

function sessionFrom(p) {
	const id = rid('cs_test');
	const amount = Number(p.get('line_items[0][price_data][unit_amount]')) * Number(p.get('line_items[0][quantity]') ?? 1);
	const currency = (p.get('line_items[0][price_data][currency]') ?? '').toLowerCase();
	const metadata = {};
	for (const [k, v] of p) {
		const m = /^metadata\[(\w+)\]$/.exec(k);
		if (m) metadata[m[1]] = v;
	}
	return {
		id,
		object: 'checkout.session',
		mode: p.get('mode') ?? 'payment',
		amount_total: amount,
		currency,
		description: p.get('line_items[0][price_data][product_data][name]') ?? '',
		client_reference_id: p.get('client_reference_id') ?? null,
		metadata,
		payment_intent: rid('pi'),
		payment_status: 'unpaid',
		status: 'open',
		success_url: p.get('success_url'),
		cancel_url: p.get('cancel_url'),
		url: `${base}/pay/${id}`,
		created: now(),
		expires_at: now() + 24 * 3600,
		amount_refunded: 0
	};
}

const publicSession = (s) => {
	const { description: _d, amount_refunded: _r, charge: _c, ...rest } = s;
	return rest;
};
const intentOf = (s, extra = {}) => ({
	id: s.payment_intent,
	object: 'payment_intent',
	amount: s.amount_total,
	currency: s.currency,
	metadata: s.metadata,
	...extra
});

const server = http.createServer(async (req, res) => {
	const url = new URL(req.url ?? '/', base);
	const body = req.method === 'POST' ? await readBody(req) : '';
	const parts = url.pathname.split('/').filter(Boolean);
	try {
		if (parts[0] === 'v1') {
			if (req.headers.authorization !== `Bearer ${KEY}`) return apiError(res, 401, 'Invalid API Key provided', 'authentication_error');
			const p = new URLSearchParams(body);
			if (req.method === 'POST' && url.pathname === '/v1/checkout/sessions') {
				const s = sessionFrom(p);
				if (!Number.isSafeInteger(s.amount_total) || s.amount_total < 1) return apiError(res, 400, 'Invalid amount');
				if (!/^[a-z]{3}$/.test(s.currency)) return apiError(res, 400, 'Invalid currency');
				sessions.set(s.id, s);
				return json(res, 200, publicSession(s));
			}
			if (parts[1] === 'checkout' && parts[2] === 'sessions' && parts[3]) {
				const s = sessions.get(parts[3]);
				if (!s) return apiError(res, 404, `No such checkout.session: '${parts[3]}'`);
				if (req.method === 'GET' && !parts[4]) return json(res, 200, publicSession(s));
				if (req.method === 'POST' && parts[4] === 'expire') {
					if (s.status !== 'open') return apiError(res, 400, 'Only an open session can be expired');
					s.status = 'expired';
					await emit('checkout.session.expired', publicSession(s));
					return json(res, 200, publicSession(s));
				}
			}
			if (req.method === 'POST' && url.pathname === '/v1/refunds') {
				// As the provider documents refunds: by payment_intent (or charge); `amount` in
				// minor units, defaulting to all that is left; several partial refunds until the
				// whole is refunded, then an error; never more than what is left. The charge keeps
				// the cumulative `amount_refunded` and `refunded` (true once in full).
				const key = req.headers['idempotency-key'];
				const seen = typeof key === 'string' ? idempotent.get(key) : undefined;
				if (seen) {
					if (seen.body !== body) return apiError(res, 400, 'Keys for idempotent requests can only be used with the same parameters they were first used with.', 'idempotency_error');
					return json(res, seen.status, seen.answer);
				}
				const answer = async (status, out) => {
					if (typeof key === 'string') idempotent.set(key, { body, status, answer: out });
					return json(res, status, out);
				};
				const pi = p.get('payment_intent');
				const ch = p.get('charge');
				const s = [...sessions.values()].find((x) => (pi && x.payment_intent === pi) || (ch && x.charge === ch));
				if (!s) return answer(404, { error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such payment_intent: '${pi ?? ch}'` } });
				if (s.payment_status !== 'paid') return answer(400, { error: { type: 'invalid_request_error', message: 'This PaymentIntent does not have a successful charge to refund.' } });
				const left = s.amount_total - s.amount_refunded;
				if (left <= 0) return answer(400, { error: { type: 'invalid_request_error', code: 'charge_already_refunded', message: `Charge ${s.charge} has already been refunded.` } });
				const asked = p.get('amount');
				const amount = asked === null ? left : /^\d+$/.test(asked) ? Number(asked) : NaN;
				if (!Number.isSafeInteger(amount) || amount < 1)
					return answer(400, { error: { type: 'invalid_request_error', code: 'parameter_invalid_integer', param: 'amount', message: 'Invalid positive integer' } });
				if (amount > left)
					return answer(400, {
						error: {
							type: 'invalid_request_error',
							code: 'amount_too_large',
							param: 'amount',
							message: `Refund amount (${money(amount, s.currency)}) is greater than unrefunded amount on charge (${money(left, s.currency)})`
						}
					});
				s.amount_refunded += amount;
				const metadata = {};
				for (const [k, v] of p) {
					const m = /^metadata\[(\w+)\]$/.exec(k);
					if (m) metadata[m[1]] = v;
				}
				const refund = { id: rid('re'), object: 'refund', amount, charge: s.charge, created: now(), currency: s.currency, payment_intent: s.payment_intent, status: 'succeeded', metadata };
				await emit('charge.refunded', {
					id: s.charge,
					object: 'charge',
					amount: s.amount_total,
					amount_captured: s.amount_total,
					amount_refunded: s.amount_refunded,
					currency: s.currency,
					paid: true,
					payment_intent: s.payment_intent,
					refunded: s.amount_refunded === s.amount_total,
					metadata: s.metadata
				});
				return answer(200, refund);
			}
			return apiError(res, 404, 'Unrecognized request URL');
		}
		if (parts[0] === 'pay' && parts[1]) {
			const s = sessions.get(parts[1]);
			if (!s) {
				res.writeHead(404, { 'content-type': 'text/plain' });
				return res.end('No such payment page');
			}
			const html = (status, message) => {
				res.writeHead(status, { 'content-type': 'text/html; charset=utf-8' });
				res.end(page(s, message));
			};
			if (req.method === 'GET') return html(200);
			if (s.status !== 'open' || s.payment_status === 'paid') return html(409, 'This payment page is closed.');
			const card = (new URLSearchParams(body).get('card') ?? '').replace(/\D/g, '');
			if (card === GOOD) {
				s.payment_status = 'paid';
				s.status = 'complete';
				s.charge = rid('ch');
				await emit('checkout.session.completed', publicSession(s));
				res.writeHead(303, { location: s.success_url });
				return res.end();
			}
			if (card === DECLINED) {
				await emit(
					'payment_intent.payment_failed',
					intentOf(s, { last_payment_error: { type: 'card_error', code: 'card_declined', decline_code: 'generic_decline', message: 'Your card was declined.' } })
				);
				return html(402, 'Your card was declined. Try another card.');
			}
			return html(400, 'Use one of the test cards shown below.');
		}
		if (parts[0] === '_fake') {
			if (req.method === 'GET' && parts[1] === 'events') return json(res, 200, events.map(({ id, type, status }) => ({ id, type, status })));
			const p = body ? JSON.parse(body) : {};
			if (req.method === 'POST' && parts[1] === 'hold') {
				hold = Boolean(p.hold);
				return json(res, 200, { hold });
			}
			if (req.method === 'POST' && parts[1] === 'webhook-url') {
				webhookUrl = String(p.url ?? '');
				return json(res, 200, { url: webhookUrl });
			}
			if (req.method === 'POST' && parts[1] === 'deliver') {
				const ev = events.find((e) => e.id === p.id);
				if (!ev) return json(res, 404, { error: 'no such event' });
				return json(res, 200, { status: await deliver(ev, p.secret ?? SECRET) });
			}
		}
		if (url.pathname === '/health') return json(res, 200, { ok: true, fake: 'payments' });
		res.writeHead(404, { 'content-type': 'text/plain' });
		res.end('Not found');
	} catch (e) {
		json(res, 500, { error: { type: 'api_error', message: String(e) } });
	}
});

server.listen(port, '127.0.0.1');
const stop = () => server.close(() => process.exit(0));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
