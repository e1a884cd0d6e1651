/**
 * Every API route and every form action, fed generated input (fast-check): path ids (ours,
 * another workshop's, unknown, malformed), query strings, JSON and non-JSON bodies, content
 * types, accept headers, origins and sessions of every role. What must hold for each answer:
 *  - never a 5xx, never a dropped connection;
 *  - an API refusal (4xx) is JSON in the one error shape `{ error: { code, message, fields? } }`;
 *  - a form action refuses as a form action does (a failure with its fields or message, an
 *    error page, or a redirect to sign in), never a 5xx.
 * Afterwards the server still answers its health check and a plain signed-in request.
 *
 * FUZZ_REQUESTS sets the count (400 in `npm test`; `npm run test:fuzz` sends 12,000). The
 * fixed cases of the settle-a-clash and sheet routes come first.
 */
import fc from 'fast-check';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { z } from 'zod';
import { components, sheets } from '../../src/lib/server/services/components';
import * as customers from '../../src/lib/server/services/customers';
import { jobs } from '../../src/lib/server/services/jobs';
import { tests as testRecords } from '../../src/lib/server/services/tests';
import { vehicles } from '../../src/lib/server/services/vehicles';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { op, push } from '../helpers/sync';

const base = inject('baseURL');
const REQUESTS = Number(process.env.FUZZ_REQUESTS ?? 400);

/** The one error body of the API. */
const errorShape = z.object({
	error: z.looseObject({ code: z.string().min(1), message: z.string().min(1), fields: z.record(z.string(), z.string()).optional() })
});

/** One check of a coil's primary winding, 0.36–0.55 Ω (common practice; invented figures). */
const CHECKS = [{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false, bands: [{ fromC: null, toC: null, min: 0.36, max: 0.55 }] }];

type Role = 'owner' | 'lead' | 'technician' | 'apprentice' | 'other' | 'none' | 'garbage';
const sessions = {} as Record<Role, string>;
const ids = {} as Record<string, string[]>;
const foreign = {} as Record<string, string[]>;
const stats = { requests: 0, fiveXx: 0, refusals: 0, shaped: 0, dropped: 0, routes: new Set<string>() };
const problems: string[] = [];
let n = 0;

async function signIn(email: string) {
	const c = new Client(base, `10.11.0.${++n}`);
	expect((await c.signIn(email, TEST_PASSWORD)).status).toBe(303);
	return [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
}

/** Two clashes in our workshop (one of them settled) and one in another workshop. */
async function makeClashes(ws: Awaited<ReturnType<typeof makeWorkshop>>, other: Awaited<ReturnType<typeof makeWorkshop>>) {
	const clash = async (w: typeof ws) => {
		const lead = new Client(base, `10.11.1.${++n}`);
		await lead.signIn(w.users.lead.email, TEST_PASSWORD);
		const job = await jobs.create(w.users.lead.actor, { complaint: 'Clashing notes' });
		await push(lead, `fuzz-a-${n}`, [op('job', 'patch', job.id as string, { notes: 'Coil 2 cracked' }, 1)]);
		const [r] = await push(lead, `fuzz-b-${n}`, [op('job', 'patch', job.id as string, { notes: 'Coil 3 cracked' }, 1)]);
		expect(r.status).toBe('conflict');
		return { id: r.conflictId!, lead, job: job.id as string };
	};
	const open = await clash(ws);
	const settled = await clash(ws);
	expect((await settled.lead.json('POST', `/api/conflicts/${settled.id}`, { pick: 'server' })).status).toBe(200);
	const theirs = await clash(other);
	return { open: open.id, settled: settled.id, theirs: theirs.id };
}

let clashes: Awaited<ReturnType<typeof makeClashes>>;
let draftSheet: string;
let approvedSheet: string;

beforeAll(async () => {
	const ws = await makeWorkshop('Fuzz');
	const other = await makeWorkshop('Fuzz other');
	for (const role of ['owner', 'lead', 'technician', 'apprentice'] as const) sessions[role] = await signIn(ws.users[role].email);
	sessions.other = await signIn(other.users.lead.email);
	sessions.none = '';
	sessions.garbage = `fb_session=${'x'.repeat(40)}`;
	const make = async (w: typeof ws) => {
		const l = w.users.lead.actor;
		const customer = await customers.create(l, { name: 'Fuzz Customer' });
		const vehicle = await vehicles.create(l, { make: 'Invented', model: 'Roadster', plate: 'FZ 01', chassisNo: 'FZ-1', chassisReason: 'Old import without a VIN', customerId: customer.id });
		const job = await jobs.create(l, { complaint: 'Fuzzed job', assigneeId: w.users.technician.id, customerId: customer.id });
		const component = await components.create(l, { partNumber: `FZ-${uuidv7().slice(-6)}`, kind: 'ignition_coil' });
		const sheet = await sheets.create(l, { componentId: component.id, checks: CHECKS });
		const test = await testRecords.create(l, { jobId: job.id });
		return { customer: [customer.id], vehicle: [vehicle.id], job: [job.id], component: [component.id], sheet: [sheet.id], test: [test.id] } as Record<string, string[]>;
	};
	Object.assign(ids, await make(ws));
	Object.assign(foreign, await make(other));
	draftSheet = ids.sheet[0];
	const approved = await sheets.create(ws.users.lead.actor, { componentId: ids.component[0], checks: CHECKS });
	await sheets.update(ws.users.lead.actor, approved.id as string, approved.version as number, {}, { serverFields: { state: 'approved' } });
	approvedSheet = approved.id as string;
	clashes = await makeClashes(ws, other);
	ids.conflict = [clashes.open, clashes.settled];
	foreign.conflict = [clashes.theirs];
}, 60_000);

type Sent = { method: string; path: string; headers: Record<string, string>; body?: string };

/** Send one request and judge its answer. */
async function judge(req: Sent, kind: 'api' | 'form' | 'page') {
	stats.requests++;
	stats.routes.add(`${req.method} ${req.path.replace(/[0-9a-f-]{36}/g, ':id').split('?')[0]}`);
	let r: Response;
	try {
		r = await fetch(base + req.path, { method: req.method, headers: req.headers, body: req.body, redirect: 'manual' });
	} catch (e) {
		stats.dropped++;
		problems.push(`${req.method} ${req.path}: no answer (${(e as Error).message})`);
		return;
	}
	const text = await r.text();
	const where = `${req.method} ${req.path} [${req.headers['content-type'] ?? '-'}] → ${r.status}`;
	if (r.status >= 500) {
		stats.fiveXx++;
		problems.push(`${where}: ${text.slice(0, 200)} — body ${String(req.body).slice(0, 200)}`);
		return;
	}
	if (r.status < 400) return;
	stats.refusals++;
	if (kind !== 'api') return;
	let body: unknown = null;
	try {
		body = JSON.parse(text);
	} catch {
		/* judged below */
	}
	if (errorShape.safeParse(body).success) stats.shaped++;
	else problems.push(`${where}: not the error shape: ${text.slice(0, 200)}`);
}

// ---- generators -------------------------------------------------------------------------

const idArb = (entity: string) =>
	fc.oneof(
		{ weight: 4, arbitrary: fc.constantFrom(...(ids[entity] ?? [uuidv7()])) },
		{ weight: 2, arbitrary: fc.constantFrom(...(foreign[entity] ?? [uuidv7()])) },
		{ weight: 1, arbitrary: fc.constant(null).map(() => uuidv7()) },
		{ weight: 1, arbitrary: fc.constant(null).map(() => uuidv4().toUpperCase()) },
		{ weight: 2, arbitrary: fc.oneof(fc.string({ maxLength: 40 }), fc.constantFrom('0', '-1', '1e9', 'null', '..', '%00', "' OR 1=1 --", 'x'.repeat(300), '00000000-0000-0000-0000-000000000000', '{}', '[]', '😀')) }
	);

const anyJson = fc.jsonValue({ maxDepth: 3 });
const fieldNames = ['complaint', 'status', 'baseVersion', 'name', 'phone', 'email', 'partNumber', 'kind', 'checks', 'componentId', 'customerId', 'vehicleId', 'assigneeId', 'jobId', 'vin', 'make', 'model', 'year', 'pick', 'deviceId', 'value', 'code', 'text', 'ops', 'notes', 'location', 'reportConsent', 'source', 'hybrid', 'odometerKm', 'plate', 'cautions', 'fitment', 'positions', 'description'];
const valueArb = fc.oneof(
	anyJson,
	fc.constantFrom(0, 1, 2, -1, 1.5, 1e308, Number.MAX_SAFE_INTEGER, '', ' ', 'open', 'closed', 'testing', 'server', 'candidate', 'value', 'ignition_coil', 'lead', 'owner', null, true, false, [], {}, 'P0301', 'x'.repeat(6000)),
	fc.constant(null).map(() => uuidv7())
);
const objectArb = fc.dictionary(fc.oneof(fc.constantFrom(...fieldNames), fc.string({ maxLength: 12 })), valueArb, { maxKeys: 8 });
const pushBodyArb = fc.record({
	deviceId: fc.oneof(fc.constant('fuzz-phone'), fc.string({ maxLength: 80 })),
	ops: fc.array(
		fc.record({
			opId: fc.oneof(fc.constant(null).map(() => uuidv7()), fc.string()),
			entity: fc.oneof(fc.constantFrom('customer', 'vehicle', 'job', 'test', 'component', 'sheet', 'reading', 'signoff', 'swap_test', 'photo', 'spark_test', 'photo_mark', 'circuit_test'), fc.string()),
			entityId: fc.oneof(fc.constant(null).map(() => uuidv7()), idArb('job'), idArb('test')),
			kind: fc.constantFrom('create', 'patch', 'delete', 'merge'),
			baseVersion: fc.oneof(fc.nat(5), fc.integer(), fc.constant(-1)),
			fields: fc.oneof(objectArb, fc.record({ testId: idArb('test'), checkKey: fc.constantFrom('primary', 'x', ''), samples: fc.array(fc.record({ value: fc.oneof(fc.double(), fc.constant('OL')), unit: fc.constantFrom('Ω', 'kΩ', 'V', '') }), { maxLength: 3 }) }), fc.record({ jobId: idArb('job'), complaint: fc.string(), status: fc.string() })),
			deviceTime: fc.oneof(fc.constant(new Date().toISOString()), fc.string())
		}, { requiredKeys: [] }),
		{ maxLength: 6 }
	)
}, { requiredKeys: [] });

/** A body as text: JSON of an object or any value, broken JSON, or nothing. */
const bodyArb = (shape: fc.Arbitrary<unknown> = objectArb) =>
	fc.oneof(
		{ weight: 6, arbitrary: shape.map((v) => JSON.stringify(v)) },
		{ weight: 2, arbitrary: anyJson.map((v) => JSON.stringify(v)) },
		{ weight: 1, arbitrary: fc.string({ maxLength: 200 }) },
		{ weight: 1, arbitrary: fc.constantFrom('', '{', '{"a":', 'null', '[]', '"x"', '\u0000', '{"__proto__":{"x":1}}', '{"constructor":{"prototype":{}}}') }
	);
const formArb = fc.dictionary(fc.oneof(fc.constantFrom(...fieldNames, 'list', 'index', 'role', 'password', 'current', 'next', 'repeat'), fc.string({ maxLength: 10 })), fc.oneof(fc.string({ maxLength: 60 }), fc.constantFrom('', '0', '-1', 'abc', 'open', 'after', 'before', 'P0301', 'lead', 'owner', 'technician', 'on', 'x'.repeat(3000))), { maxKeys: 8 });
const queryArb = fc.dictionary(fc.oneof(fc.constantFrom('q', 'status', 'assignee', 'vehicle', 'customer', 'from', 'to', 'sort', 'page', 'pageSize', 'kind', 'sheets', 'state', 'componentId', 'consent', 'hybrid', 'cursor', 'limit', 'v', 'snapshot', 'delimiter', 'next'), fc.string({ maxLength: 8 })), fc.oneof(fc.string({ maxLength: 30 }), fc.constantFrom('', '0', '-1', '1e3', '101', 'all', 'open', '-created', 'name', 'yes', 'semicolon', '2', '1.0.', '99999999999999999999')), { maxKeys: 5 });

const roleArb = fc.constantFrom<Role>('owner', 'lead', 'lead', 'technician', 'technician', 'apprentice', 'other', 'none', 'garbage');
const jsonTypes = fc.constantFrom('application/json', 'application/json', 'application/json', 'application/json; charset=utf-8', 'text/plain', 'text/csv', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x', 'application/xml', '', 'garbage/type');

type Route = { kind: 'api' | 'form' | 'page'; method: string; path: fc.Arbitrary<string>; body?: fc.Arbitrary<string | undefined>; type?: fc.Arbitrary<string> };
const p = (template: string, ...entities: string[]) =>
	fc.tuple(...entities.map((e) => idArb(e)), fc.boolean()).map((parts) => {
		const raw = parts.pop() as boolean;
		let i = 0;
		return template.replace(/:id/g, () => (raw ? String(parts[i++]) : encodeURIComponent(String(parts[i++]))));
	});
const withQuery = (path: fc.Arbitrary<string>) => fc.tuple(path, queryArb).map(([pth, q]) => `${pth}${Object.keys(q).length ? `?${new URLSearchParams(q)}` : ''}`);

const routes = (): Route[] => [
	{ kind: 'api', method: 'GET', path: withQuery(fc.constantFrom('/api/me', '/api/health', '/api/jobs', '/api/jobs/assignees', '/api/customers', '/api/vehicles', '/api/components', '/api/components/csv', '/api/sheets', '/api/conflicts', '/api/sync/pull', '/api/nothing-here')) },
	{ kind: 'api', method: 'GET', path: withQuery(fc.oneof(p('/api/jobs/:id', 'job'), p('/api/customers/:id', 'customer'), p('/api/vehicles/:id', 'vehicle'), p('/api/components/:id', 'component'), p('/api/sheets/:id', 'sheet'), p('/api/sync/jobs/:id', 'job'))) },
	{ kind: 'api', method: 'POST', path: fc.constantFrom('/api/jobs', '/api/customers', '/api/vehicles', '/api/components', '/api/sheets'), body: bodyArb() },
	{ kind: 'api', method: 'PATCH', path: fc.oneof(p('/api/jobs/:id', 'job'), p('/api/customers/:id', 'customer'), p('/api/vehicles/:id', 'vehicle'), p('/api/components/:id', 'component'), p('/api/sheets/:id', 'sheet')), body: bodyArb() },
	{ kind: 'api', method: 'POST', path: p('/api/jobs/:id/status', 'job'), body: bodyArb(fc.record({ status: valueArb, baseVersion: fc.oneof(fc.nat(4), valueArb) }, { requiredKeys: [] })) },
	{ kind: 'api', method: 'DELETE', path: p('/api/sheets/:id', 'sheet'), body: bodyArb(fc.record({ baseVersion: fc.oneof(fc.nat(4), valueArb) }, { requiredKeys: [] })) },
	{ kind: 'api', method: 'POST', path: p('/api/sheets/:id/approve', 'sheet'), body: bodyArb(fc.record({ baseVersion: fc.oneof(fc.nat(4), valueArb) }, { requiredKeys: [] })) },
	{ kind: 'api', method: 'POST', path: p('/api/sheets/:id/next-draft', 'sheet'), body: fc.option(bodyArb(), { nil: undefined }) },
	{ kind: 'api', method: 'POST', path: p('/api/conflicts/:id', 'conflict'), body: bodyArb(fc.oneof(fc.record({ pick: fc.constantFrom('server', 'candidate', 'value', 'both', ''), deviceId: fc.oneof(fc.string(), fc.constantFrom('fuzz-a-1', 'fuzz-b-2')), value: valueArb }, { requiredKeys: [] }), objectArb)) },
	{ kind: 'api', method: 'POST', path: fc.constant('/api/sync/push'), body: bodyArb(pushBodyArb) },
	{ kind: 'api', method: 'POST', path: fc.constant('/api/components/csv'), body: fc.oneof(fc.string({ maxLength: 300 }), fc.constantFrom('part_number,kind\nFZ-1,ignition_coil\n', 'a;b;c\n1;2', '"unterminated\n', '\ufeffpart_number\n')), type: fc.constantFrom('text/csv', 'text/plain', 'application/json', '') },
	{ kind: 'api', method: 'PUT', path: fc.constantFrom('/api/jobs', '/api/me', '/api/sync/push'), body: bodyArb() },
	{ kind: 'api', method: 'GET', path: withQuery(fc.constant('/api/pricing')) },
	{ kind: 'api', method: 'POST', path: fc.constant('/api/pay/webhook'), body: bodyArb() },
	{ kind: 'api', method: 'POST', path: p('/api/quotes/:id/link', 'job'), body: bodyArb() },
	{ kind: 'api', method: 'GET', path: withQuery(fc.oneof(fc.constant('/api/payments'), p('/api/quotes/:id/link', 'job'))) },
	{ kind: 'api', method: 'POST', path: p('/api/payments/:id/refund', 'job'), body: bodyArb(fc.record({ amount: fc.oneof(fc.constantFrom('1', '0.01', '-1', '£2.50', '1e3', ''), valueArb), reason: valueArb }, { requiredKeys: [] })) },
	{ kind: 'form', method: 'POST', path: fc.oneof(fc.constantFrom('/pricing?/settings', '/pricing?/add', '/pricing?/remove', '/q/AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA?/answer', '/q/x?/pay'), p('/jobs/:id/money?/link', 'job'), p('/jobs/:id/money?/verbal', 'job'), p('/jobs/:id/money?/card', 'job'), p('/jobs/:id/money?/manual', 'job'), p('/jobs/:id/money?/refund', 'job')) },
	{ kind: 'page', method: 'GET', path: withQuery(fc.oneof(p('/jobs/:id/money', 'job'), fc.constantFrom('/payments', '/pricing', '/q/AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA', '/q/short'))) },
	{ kind: 'api', method: 'DELETE', path: fc.oneof(p('/api/jobs/:id', 'job'), fc.constant('/api/customers')) },
	{ kind: 'api', method: 'GET', path: withQuery(fc.oneof(p('/api/photos/:id', 'job'), p('/api/photos/:id/file', 'job'), p('/api/jobs/:id/photos', 'job'))) },
	{ kind: 'api', method: 'PUT', path: withQuery(p('/api/photos/:id', 'job')), body: fc.oneof(fc.string({ maxLength: 300 }), bodyArb()), type: fc.constantFrom('image/jpeg', 'image/png', 'application/octet-stream', '') },
	{ kind: 'api', method: 'POST', path: p('/api/photos/:id/marks', 'job'), body: bodyArb(fc.record({ mark: fc.oneof(fc.constantFrom('removed', 'for_customer', 'not_for_customer', ''), valueArb) }, { requiredKeys: [] })) },
	{ kind: 'form', method: 'POST', path: fc.constantFrom('/jobs/new', '/customers/new', '/vehicles/new', '/team?/invite', '/team?/windows', '/sign-in', '/sign-in?next=%2Fjobs', '/password', '/sign-out') },
	{ kind: 'form', method: 'POST', path: fc.oneof(p('/jobs/:id?/update', 'job'), p('/jobs/:id?/status', 'job'), p('/jobs/:id?/addCode', 'job'), p('/jobs/:id?/removeCode', 'job'), p('/jobs/:id?/photoMark', 'job'), p('/customers/:id?/update', 'customer'), p('/vehicles/:id?/update', 'vehicle'), p('/jobs/:id?/nothing', 'job')) },
	{ kind: 'page', method: 'GET', path: withQuery(fc.oneof(p('/jobs/:id', 'job'), p('/customers/:id', 'customer'), p('/vehicles/:id', 'vehicle'), p('/library/:id', 'component'), p('/library/:id/edit', 'component'), p('/library/:id/sheets/:id', 'component', 'sheet'), p('/field/job/:id', 'job'), fc.constantFrom('/jobs', '/jobs/new', '/customers/new', '/vehicles/new', '/team', '/library', '/sign-in', '/shell', '/field'))) }
];

const requestArb = (list: Route[]) => fc.integer({ min: 0, max: list.length - 1 }).chain((i) => {
	const route = list[i];
	const form = route.kind === 'form';
	return fc.record({
		route: fc.constant(route),
		path: route.path,
		role: roleArb,
		body: form ? formArb.map((f) => new URLSearchParams(f).toString()) : (route.body ?? fc.constant(undefined)),
		type: form ? fc.constantFrom('application/x-www-form-urlencoded', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=zz', 'text/plain', 'application/json') : (route.type ?? jsonTypes),
		accept: fc.constantFrom('application/json', 'text/html', '*/*', ''),
		action: fc.boolean(),
		origin: fc.constantFrom('same', 'same', 'same', 'same', 'none', 'foreign')
	});
});

type Generated = { route: Route; path: string; role: Role; body: string | undefined; type: string; accept: string; action: boolean; origin: string };
function toRequest(x: Generated): Sent {
	const headers: Record<string, string> = { 'x-forwarded-for': `10.12.${n % 250}.${stats.requests % 250}` };
	// Signing out ends every session of the user: only a forged or no session is fuzzed there.
	const role = x.path.startsWith('/sign-out') && !['none', 'garbage'].includes(x.role) ? 'garbage' : x.role;
	if (sessions[role]) headers.cookie = sessions[role];
	if (x.body !== undefined && x.type) headers['content-type'] = x.type;
	if (x.accept) headers.accept = x.accept;
	if (x.action && x.route.kind === 'form') headers['x-sveltekit-action'] = 'true';
	if (x.origin === 'same') headers.origin = base;
	if (x.origin === 'foreign') headers.origin = 'https://elsewhere.example';
	return { method: x.route.method, path: x.path, headers, body: x.body };
}

describe('every route and form action under generated input', () => {
	it('settles no clash with a bad pick, an unknown, a settled or another workshop’s clash', async () => {
		const lead = { cookie: sessions.lead, origin: base, 'content-type': 'application/json', accept: 'application/json' };
		const cases: [string, unknown, number][] = [
			[clashes.open, { pick: 'both' }, 400],
			[clashes.open, { pick: 'candidate', deviceId: 'no-such-phone' }, 400],
			[clashes.open, { pick: 'value' }, 400],
			[clashes.open, { pick: 'value', value: 'x'.repeat(6000) }, 400],
			[clashes.open, [], 400],
			[uuidv7(), { pick: 'server' }, 404],
			['not-an-id', { pick: 'server' }, 404],
			[clashes.settled, { pick: 'server' }, 400],
			[clashes.theirs, { pick: 'server' }, 404]
		];
		for (const [id, body, status] of cases) {
			const r = await fetch(`${base}/api/conflicts/${id}`, { method: 'POST', headers: lead, body: JSON.stringify(body) });
			const answer = await r.json();
			expect([r.status, errorShape.safeParse(answer).success], `${id} ${JSON.stringify(body)}: ${JSON.stringify(answer)}`).toEqual([status, true]);
		}
		const tech = await fetch(`${base}/api/conflicts/${clashes.open}`, { method: 'POST', headers: { ...lead, cookie: sessions.technician }, body: '{"pick":"server"}' });
		expect(tech.status).toBe(403);
	});

	it('refuses sheet approval and next drafts with bad input, in the error shape', async () => {
		const lead = { cookie: sessions.lead, origin: base, 'content-type': 'application/json', accept: 'application/json' };
		const cases: [string, string | undefined, number][] = [
			[`/api/sheets/${draftSheet}/approve`, '{}', 400],
			[`/api/sheets/${draftSheet}/approve`, '{"baseVersion":"one"}', 400],
			[`/api/sheets/${draftSheet}/approve`, '{"baseVersion":99}', 409],
			[`/api/sheets/${draftSheet}/approve`, '{', 400],
			[`/api/sheets/${approvedSheet}/approve`, '{"baseVersion":2}', 409],
			[`/api/sheets/${foreign.sheet[0]}/approve`, '{"baseVersion":1}', 404],
			[`/api/sheets/not-a-sheet/approve`, '{"baseVersion":1}', 404],
			[`/api/sheets/${uuidv7()}/next-draft`, undefined, 404],
			[`/api/sheets/${foreign.sheet[0]}/next-draft`, undefined, 404],
			[`/api/sheets/%00/next-draft`, '{}', 404]
		];
		for (const [path, body, status] of cases) {
			const r = await fetch(base + path, { method: 'POST', headers: lead, body });
			const answer = await r.json();
			expect([r.status, errorShape.safeParse(answer).success], `${path} ${body}: ${JSON.stringify(answer)}`).toEqual([status, true]);
		}
	});

	it(`answers ${REQUESTS} generated requests without a 5xx, every API refusal in the error shape`, async () => {
		const samples = fc.sample(requestArb(routes()), REQUESTS) as Generated[];
		const queue = samples.map(toRequest);
		const kinds = samples.map((s) => s.route.kind);
		let next = 0;
		const worker = async () => {
			while (next < queue.length) {
				const i = next++;
				await judge(queue[i], kinds[i]);
			}
		};
		await Promise.all(Array.from({ length: 4 }, worker));
		console.log(`fuzz: ${stats.requests} requests over ${stats.routes.size} method and route pairs; ${stats.refusals} refusals, ${stats.shaped} API refusals in the error shape; ${stats.fiveXx} 5xx; ${stats.dropped} without an answer`);
		expect(problems.slice(0, 15)).toEqual([]);
		expect(stats.fiveXx).toBe(0);
		// Still healthy: the health check, and a signed-in read.
		expect((await fetch(`${base}/api/health`)).status).toBe(200);
		const me = await fetch(`${base}/api/me`, { headers: { cookie: sessions.technician } });
		expect(me.status).toBe(200);
	}, 900_000);
});
