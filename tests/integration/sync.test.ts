import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { AuditEntry, Job } from '../../src/lib/server/db/models';
import { components, sheets } from '../../src/lib/server/services/components';
import { jobs } from '../../src/lib/server/services/jobs';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { create, op, pullAll, push } from '../helpers/sync';

const base = inject('baseURL');
let ws: Awaited<ReturnType<typeof makeWorkshop>>;
let other: Awaited<ReturnType<typeof makeWorkshop>>;
let tech: Client;
let lead: Client;
let jobId: string;
let sheetId: string;
let componentId: string;
let n = 0;

async function signedIn(email: string) {
	const c = new Client(base, `10.7.0.${++n}`);
	const r = await c.signIn(email, TEST_PASSWORD);
	expect(r.status).toBe(303);
	return c;
}

/**
 * A coil's primary winding: cold spec (below 50 °C) 0.36–0.55 Ω, hot spec (50–100 °C)
 * 0.45–0.65 Ω — common practice, no published source.
 */
const CHECKS = [
	{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false,
		bands: [{ fromC: null, toC: 50, min: 0.36, max: 0.55 }, { fromC: 50, toC: 100, min: 0.45, max: 0.65 }] },
	{ key: 'boot', label: 'HT boot', quantity: 'visual', from: null, to: null, condition: 'key_off', unit: null, openOk: false, bands: [] }
];

beforeAll(async () => {
	ws = await makeWorkshop('Sync');
	other = await makeWorkshop('Sync other');
	const l = ws.users.lead.actor;
	jobId = (await jobs.create(l, { complaint: 'Misfire on cylinder 2', assigneeId: ws.users.technician.id })).id as string;
	componentId = (await components.create(l, { partNumber: `SY-${uuidv7().slice(-6)}`, kind: 'ignition_coil' })).id as string;
	const draft = await sheets.create(l, { componentId, checks: CHECKS });
	sheetId = draft.id as string;
	await sheets.update(l, sheetId, draft.version as number, {}, { serverFields: { state: 'approved', approvedBy: l.userId, approvedAt: new Date() } });
	tech = await signedIn(ws.users.technician.email);
	lead = await signedIn(ws.users.lead.email);
});

const newTest = (extra: Record<string, unknown> = {}) =>
	create('test', {
		jobId,
		componentId,
		sheetId,
		meter: { ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }], leadResistance: 0.1, relativeMode: false },
		temperature: { mode: 'measured', tempC: 20 },
		...extra
	});
const reading = (testId: string, value: number | 'OL', deviceResult?: object) =>
	create('reading', { testId, checkKey: 'primary', samples: [{ value, unit: 'Ω' }], ...(deviceResult ? { deviceResult } : {}) });

describe('push', () => {
	it('answers a replayed batch with duplicate and the first results, changing nothing', async () => {
		const t = newTest();
		const ops = [t, reading(t.entityId, 0.62), op('job', 'patch', jobId, { notes: 'Coil boots look cracked' }, 1)];
		const first = await push(tech, 'phone-a', ops);
		expect(first.map((r) => r.status)).toEqual(['applied', 'applied', 'applied']);
		const countRows = async () => (await db().query<{ n: number }>('SELECT (SELECT COUNT(*) FROM changes) + (SELECT COUNT(*) FROM readings) + (SELECT COUNT(*) FROM audit_log) AS n', { type: QueryTypes.SELECT }))[0].n;
		const before = await countRows();
		const again = await push(tech, 'phone-a', ops);
		expect(again.map((r) => r.status)).toEqual(['duplicate', 'duplicate', 'duplicate']);
		expect(again.map((r) => r.firstStatus)).toEqual(first.map((r) => r.status));
		expect(again.map((r) => r.version)).toEqual(first.map((r) => r.version));
		expect(await countRows()).toBe(before);
	});

	it('answers a half-stored batch sent again with duplicates for the stored half and applies the rest once', async () => {
		// A phone lost the answer to a push that stored its first readings, then sends them
		// again with new ones; a reading with a taken id under a new op id comes along too.
		const t = newTest();
		const stored = [reading(t.entityId, 0.5), reading(t.entityId, 0.51)];
		expect((await push(tech, 'phone-a', [t, ...stored])).map((r) => r.status)).toEqual(['applied', 'applied', 'applied']);
		const fresh = [reading(t.entityId, 0.52), reading(t.entityId, 0.53)];
		const sameRecord = { ...stored[0], opId: uuidv7() };
		const otherFields = { ...stored[1], opId: uuidv7(), fields: { ...stored[1].fields, samples: [{ value: 0.9, unit: 'Ω' }] } };
		const count = async () => Number((await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE test_id = ?', { replacements: [t.entityId], type: QueryTypes.SELECT }))[0].n);
		// The first op is new, so the batch goes in bulk first and the stored ones trip the unique keys.
		const batch = [fresh[0], stored[0], stored[1], sameRecord, otherFields, fresh[1]];
		const res = await push(tech, 'phone-a', batch);
		expect(res.map((r) => r.status)).toEqual(['applied', 'duplicate', 'duplicate', 'applied', 'rejected', 'applied']);
		expect(res.map((r) => r.firstStatus)).toEqual([undefined, 'applied', 'applied', undefined, undefined, undefined]);
		expect(res[4].reason).toBe('id_conflict');
		expect(await count()).toBe(4);
		// And once more (now the first op is stored, so the lookups come first): all duplicates.
		const again = await push(tech, 'phone-a', batch);
		expect(again.map((r) => r.status)).toEqual(Array(6).fill('duplicate'));
		expect(again.map((r) => r.firstStatus)).toEqual(['applied', 'applied', 'applied', 'applied', 'rejected', 'applied']);
		expect(await count()).toBe(4);
	});

	it('answers not_found for a reading whose id another workshop holds, and still applies its neighbours', async () => {
		const t = newTest();
		await push(tech, 'phone-a', [t]);
		const foreignTest = (await import('../../src/lib/server/services/tests')).tests;
		const otherJob = (await jobs.create(other.users.lead.actor, { complaint: 'Elsewhere' })).id as string;
		const ot = await foreignTest.create(other.users.lead.actor, { jobId: otherJob, position: '1' });
		const theirs = reading(ot.id as string, 0.5);
		const otherLead = new Client(base, `10.7.1.${++n}`);
		expect((await otherLead.signIn(other.users.lead.email, TEST_PASSWORD)).status).toBe(303);
		expect((await push(otherLead, 'tablet-x', [theirs]))[0].status).toBe('applied');
		const mine = reading(t.entityId, 0.5);
		const res = await push(tech, 'phone-a', [mine, { ...reading(t.entityId, 0.5), entityId: theirs.entityId }, reading(t.entityId, 0.51)]);
		expect(res.map((r) => r.status)).toEqual(['applied', 'rejected', 'applied']);
		expect(res[1].reason).toBe('not_found');
	});

	it('lets two devices editing different fields of one job both land', async () => {
		const job = await Job.findByPk(jobId);
		const v = job!.version;
		const a = await push(tech, 'phone-a', [op('job', 'patch', jobId, { location: 'Bay 3' }, v)]);
		const b = await push(lead, 'tablet-b', [op('job', 'patch', jobId, { status: 'testing' }, v)]);
		expect(a[0].status).toBe('applied');
		expect(b[0].status).toBe('merged');
		const after = await Job.findByPk(jobId);
		expect(after).toMatchObject({ location: 'Bay 3', status: 'testing', version: v + 2 });
	});

	it('turns two devices editing the same field into exactly one open conflict, keeping the server value', async () => {
		const v = (await Job.findByPk(jobId))!.version;
		const a = await push(tech, 'phone-a', [op('job', 'patch', jobId, { complaint: 'Misfire, worse when damp' }, v)]);
		const b = await push(lead, 'tablet-b', [op('job', 'patch', jobId, { complaint: 'Misfire under load' }, v)]);
		const c = await push(lead, 'tablet-c', [op('job', 'patch', jobId, { complaint: 'Misfire at idle' }, v)]);
		expect(a[0].status).toBe('applied');
		expect(b[0].status).toBe('conflict');
		expect(c[0].conflictId).toBe(b[0].conflictId);
		expect((await Job.findByPk(jobId))!.complaint).toBe('Misfire, worse when damp');
		const list = await (await lead.get('/api/conflicts')).json();
		const mine = list.items.filter((x: { entityId: string; field: string }) => x.entityId === jobId && x.field === 'complaint');
		expect(mine).toHaveLength(1);
		expect(mine[0].candidates.map((k: { value: string }) => k.value).sort()).toEqual(['Misfire at idle', 'Misfire under load']);
	});

	it('settles a conflict by picking a candidate, as a new audited version', async () => {
		const list = await (await lead.get('/api/conflicts')).json();
		const c = list.items.find((x: { entityId: string; field: string }) => x.entityId === jobId && x.field === 'complaint');
		expect((await tech.json('POST', `/api/conflicts/${c.conflictId}`, { pick: 'server' })).status).toBe(403);
		const r = await lead.json('POST', `/api/conflicts/${c.conflictId}`, { pick: 'candidate', deviceId: 'tablet-b' });
		expect(r.status).toBe(200);
		expect((await Job.findByPk(jobId))!.complaint).toBe('Misfire under load');
		const after = await (await lead.get('/api/conflicts')).json();
		expect(after.items.some((x: { conflictId: string }) => x.conflictId === c.conflictId)).toBe(false);
		const audit = await AuditEntry.findAll({ where: { entityId: jobId, field: 'complaint', userId: ws.users.lead.id } });
		expect(audit.length).toBeGreaterThanOrEqual(1);
	});

	it('keeps readings from three devices for one test', async () => {
		const t = newTest();
		await push(tech, 'phone-a', [t]);
		const devices = ['phone-a', 'phone-b', 'phone-c'];
		const sent = devices.map(() => [reading(t.entityId, 0.5), reading(t.entityId, 0.52)]);
		const results = await Promise.all(devices.map((d, i) => push(d === 'phone-a' ? tech : lead, d, sent[i])));
		expect(results.flat().every((r) => r.status === 'applied')).toBe(true);
		const [row] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE test_id = ?', { replacements: [t.entityId], type: QueryTypes.SELECT });
		expect(Number(row.n)).toBe(6);
	});

	it('recomputes each reading on the server and records a mismatch with the device', async () => {
		const t = newTest();
		// 0.75 Ω read − 0.1 Ω leads = 0.65 Ω against the cold spec 0.36–0.55 Ω: over spec.
		const r1 = reading(t.entityId, 0.75, { value: 0.65, verdict: 'within' });
		const r2 = reading(t.entityId, 0.55, { value: 0.45, verdict: 'within' });
		await push(tech, 'phone-a', [t, r1, r2]);
		const rows = await db().query<{ id: string; server_result: string; mismatch: number }>('SELECT id, server_result, mismatch FROM readings WHERE test_id = ? ORDER BY seq', {
			replacements: [t.entityId],
			type: QueryTypes.SELECT
		});
		expect(JSON.parse(rows[0].server_result)).toMatchObject({ verdict: 'high' });
		expect(JSON.parse(rows[0].server_result).value).toBeCloseTo(0.65, 12);
		expect(rows.map((r) => r.mismatch)).toEqual([1, 0]);
		const [m] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM reading_mismatches WHERE reading_id = ?', { replacements: [r1.entityId], type: QueryTypes.SELECT });
		expect(Number(m.n)).toBe(1);
	});

	it('recomputes with the phone’s rules: a bad zero, over range, the lead reading’s error, a visual finding', async () => {
		// ±(0.5 % + 2 counts) at 0.01 Ω (the meter accuracy form), leads 0.20 Ω read on it.
		const meter = {
			ranges: [
				{ label: '20 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
				{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: 19990 }
			],
			leadResistance: 0.2,
			relativeMode: false,
			leadReadAt: '2026-12-02T08:00:00.000Z'
		};
		const t = newTest({ meter });
		const at = (value: number | 'OL', rangeLabel: string, deviceResult: object) =>
			create('reading', { testId: t.entityId, checkKey: 'primary', samples: [{ value, unit: 'Ω' }], rangeLabel, deviceResult });
		const badZero = at(0.15, '20 Ω', { value: 0, verdict: 'bad_zero' });
		const over = at('OL', '20 Ω', { value: null, verdict: 'over_range', ol: true });
		const open = at('OL', '20 kΩ', { value: null, verdict: 'high', ol: true });
		// 0.59 − 0.20 = 0.39 Ω ± (0.02295 + 0.021): straddles the 0.36 Ω minimum. With the ± of
		// 0.39 Ω alone (0.02195) it would have passed as OK.
		const close = at(0.59, '20 Ω', { value: 0.39, verdict: 'borderline' });
		const look = create('reading', { testId: t.entityId, checkKey: 'boot', samples: [], visual: { ok: false, note: 'Tracking marks on the boot' }, deviceResult: { value: null, verdict: 'not_ok' } });
		const res = await push(tech, 'phone-a', [t, badZero, over, open, close, look]);
		expect(res.map((r) => r.status)).toEqual(Array(6).fill('applied'));
		const rows = await db().query<{ server_result: string; mismatch: number; visual: string | null }>(
			'SELECT server_result, mismatch, visual FROM readings WHERE test_id = ? ORDER BY seq',
			{ replacements: [t.entityId], type: QueryTypes.SELECT }
		);
		expect(rows.map((r) => JSON.parse(r.server_result).verdict)).toEqual(['bad_zero', 'over_range', 'high', 'borderline', 'not_ok']);
		expect(JSON.parse(rows[3].server_result).u).toBeCloseTo(0.04395, 12);
		expect(rows.map((r) => r.mismatch)).toEqual([0, 0, 0, 0, 0]); // the phone and the server agree
		expect(JSON.parse(rows[4].visual!)).toEqual({ ok: false, note: 'Tracking marks on the boot' });
	});

	it('refuses a reading with neither samples nor a visual finding', async () => {
		const t = newTest();
		const empty = create('reading', { testId: t.entityId, checkKey: 'primary', samples: [] });
		const res = await push(tech, 'phone-a', [t, empty]);
		expect(res[1]).toMatchObject({ status: 'rejected', reason: 'invalid' });
	});

	it('rejects a create replayed under another op id with different fields as id_conflict', async () => {
		const c = create('customer', { name: 'Ines Varga' });
		expect((await push(tech, 'phone-a', [c]))[0].status).toBe('applied');
		const again = { ...c, opId: uuidv7(), fields: { name: 'Someone else' } };
		expect((await push(tech, 'phone-a', [again]))[0]).toMatchObject({ status: 'rejected', reason: 'id_conflict' });
		const t = newTest();
		const r = reading(t.entityId, 0.5);
		await push(tech, 'phone-a', [t, r]);
		const r2 = { ...r, opId: uuidv7(), fields: { ...r.fields, samples: [{ value: 0.9, unit: 'Ω' }] } };
		expect((await push(tech, 'phone-a', [r2]))[0]).toMatchObject({ status: 'rejected', reason: 'id_conflict' });
	});

	it('answers not_found for another workshop’s record and audits the attempt', async () => {
		const foreign = (await jobs.create(other.users.lead.actor, { complaint: 'Not theirs' })).id as string;
		const res = await push(lead, 'tablet-b', [op('job', 'patch', foreign, { notes: 'sneaky' }, 1)]);
		expect(res[0]).toMatchObject({ status: 'rejected', reason: 'not_found' });
		expect((await Job.findByPk(foreign))!.notes).toBeNull();
		expect(await AuditEntry.count({ where: { entityId: foreign, action: 'refused_foreign' } })).toBe(1);
	});

	it('rejects a patch of an append-only record and an apprentice touching another’s job', async () => {
		const t = newTest();
		const r = reading(t.entityId, 0.5);
		await push(tech, 'phone-a', [t, r]);
		expect((await push(tech, 'phone-a', [op('reading', 'patch', r.entityId, { checkKey: 'x' }, 1)]))[0]).toMatchObject({ status: 'rejected', reason: 'append_only' });
		const app = await signedIn(ws.users.apprentice.email);
		const v = (await Job.findByPk(jobId))!.version;
		expect((await push(app, 'phone-x', [op('job', 'patch', jobId, { notes: 'x' }, v)]))[0]).toMatchObject({ status: 'rejected', reason: 'forbidden' });
	});

	it('lets the author discard a draft sheet through sync, and refuses another technician', async () => {
		const draft = create('sheet', { componentId, checks: CHECKS });
		expect((await push(tech, 'phone-a', [draft]))[0].status).toBe('applied');
		const app = await signedIn(ws.users.apprentice.email);
		expect((await push(app, 'phone-x', [op('sheet', 'delete', draft.entityId, {}, 1)]))[0]).toMatchObject({ status: 'rejected', reason: 'forbidden' });
		expect((await push(tech, 'phone-a', [op('sheet', 'delete', draft.entityId, {}, 1)]))[0].status).toBe('applied');
	});

	it('applies the rest of a batch when one op fails', async () => {
		const bad = create('customer', { name: '' });
		const good = create('customer', { name: 'Orrin Pell' });
		const res = await push(tech, 'phone-a', [bad, good]);
		expect(res[0]).toMatchObject({ status: 'rejected', reason: 'invalid' });
		expect(res[1].status).toBe('applied');
	});
});

describe('push size and schema', () => {
	it('answers 413 for more than 1,000 ops, before looking at them', async () => {
		const ops = Array.from({ length: 1001 }, () => ({ nonsense: true }));
		const r = await tech.json('POST', '/api/sync/push', { deviceId: 'p', ops });
		expect(r.status).toBe(413);
		expect((await r.json()).error.code).toBe('too_large');
	});

	it('answers 413 for a body over 1 MiB', async () => {
		const r = await tech.json('POST', '/api/sync/push', { deviceId: 'p', ops: [], pad: 'x'.repeat(1024 * 1024) });
		expect(r.status).toBe(413);
	});

	it('answers 400 naming the first bad op and field, applying nothing', async () => {
		const good = create('customer', { name: 'Never Stored' });
		const bad = { ...create('customer', { name: 'x' }), entityId: 'not-a-uuid' };
		const r = await tech.json('POST', '/api/sync/push', { deviceId: 'p', ops: [good, bad] });
		expect(r.status).toBe(400);
		const body = await r.json();
		expect(Object.keys(body.error.fields)).toEqual(['ops.1.entityId']);
		const [row] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM customers WHERE id = ?', { replacements: [good.entityId], type: QueryTypes.SELECT });
		expect(Number(row.n)).toBe(0);
	});

	it('answers 401 to a push and a pull when signed out, and 400 to a malformed body', async () => {
		const anon = new Client(base);
		expect((await anon.json('POST', '/api/sync/push', { deviceId: 'p', ops: [] })).status).toBe(401);
		expect((await anon.get('/api/sync/pull?cursor=0')).status).toBe(401);
		expect((await tech.json('POST', '/api/sync/push', '{"deviceId":')).status).toBe(400);
	});
});

describe('pull', () => {
	it('answers 400 to a cursor that is not a number or is ahead of the feed', async () => {
		expect((await lead.get('/api/sync/pull?cursor=abc')).status).toBe(400);
		expect((await lead.get('/api/sync/pull?cursor=999999999')).status).toBe(400);
	});

	it('returns every change exactly once across pages, under two concurrent pushers', async () => {
		const w = await makeWorkshop('Pull');
		const j = (await jobs.create(w.users.lead.actor, { complaint: 'Pull test', assigneeId: w.users.technician.id })).id as string;
		const a = await signedIn(w.users.technician.email);
		const b = await signedIn(w.users.lead.email);
		const t = create('test', { jobId: j });
		await push(a, 'phone-a', [t]);
		const batches = (k: number) => Array.from({ length: 6 }, () => Array.from({ length: 15 }, () => create('reading', { testId: t.entityId, checkKey: `c${k}`, samples: [{ value: 1, unit: 'Ω' }] })));
		const pushes = [a, b].map(async (c, k) => {
			for (const ops of batches(k)) await push(c, `dev-${k}`, ops);
		});
		const seen: number[] = [];
		let cursor = 0;
		const puller = (async () => {
			for (let i = 0; i < 40; i++) {
				const page = await pullAll(b, cursor, 7);
				seen.push(...page.changes.map((c) => c.seq));
				cursor = page.cursor;
				await new Promise((r) => setTimeout(r, 20));
			}
		})();
		await Promise.all([...pushes, puller]);
		const rest = await pullAll(b, cursor, 7);
		seen.push(...rest.changes.map((c) => c.seq));
		const readings = await db().query<{ seq: number }>('SELECT seq FROM readings WHERE test_id = ?', { replacements: [t.entityId], type: QueryTypes.SELECT });
		expect(readings).toHaveLength(180);
		expect(new Set(seen).size).toBe(seen.length); // nothing twice
		for (const r of readings) expect(seen).toContain(Number(r.seq)); // nothing missed
		expect(seen).toEqual([...seen].sort((x, y) => x - y));
	});

	it('scopes a technician to assigned jobs and the approved library', async () => {
		const w = await makeWorkshop('Scope');
		const l = w.users.lead.actor;
		const mineJob = (await jobs.create(l, { complaint: 'Mine', assigneeId: w.users.technician.id })).id;
		const theirJob = (await jobs.create(l, { complaint: 'Theirs', assigneeId: w.users.apprentice.id })).id;
		const comp = (await components.create(l, { partNumber: 'SC-1', kind: 'relay' })).id as string;
		const draft = await sheets.create(l, { componentId: comp, checks: CHECKS });
		const c = await signedIn(w.users.technician.email);
		let ids = (await pullAll(c)).changes.map((x) => x.entityId);
		expect(ids).toContain(mineJob);
		expect(ids).not.toContain(theirJob);
		expect(ids).toContain(comp);
		expect(ids).not.toContain(draft.id);
		await sheets.update(l, draft.id as string, 1, {}, { serverFields: { state: 'approved' } });
		ids = (await pullAll(c)).changes.map((x) => x.entityId);
		expect(ids).toContain(draft.id);
		const all = (await pullAll(await signedIn(w.users.lead.email))).changes.map((x) => x.entityId);
		expect(all).toEqual(expect.arrayContaining([mineJob, theirJob, comp, draft.id]));
	});

	it('answers duplicate for a stored reading sent again after its job went to someone else', async () => {
		// The phone retries a batch whose first op is new: the bulk insert goes first, and the
		// stored reading is refused before any insert (the job is no longer this technician's).
		const w = await makeWorkshop('Retry after reassign');
		const l = w.users.lead.actor;
		const j = await jobs.create(l, { complaint: 'Retried', assigneeId: w.users.technician.id });
		const techC = await signedIn(w.users.technician.email);
		const t = create('test', { jobId: j.id });
		const stored = create('reading', { testId: t.entityId, checkKey: 'primary', samples: [{ value: 0.5, unit: 'Ω' }] });
		expect((await push(techC, 'phone-a', [t, stored])).map((r) => r.status)).toEqual(['applied', 'applied']);
		await jobs.update(l, j.id as string, (await Job.findByPk(j.id as string))!.version, { assigneeId: w.users.apprentice.id });
		const late = create('reading', { testId: t.entityId, checkKey: 'primary', samples: [{ value: 0.51, unit: 'Ω' }] });
		const res = await push(techC, 'phone-a', [late, stored]);
		expect(res.map((r) => r.status)).toEqual(['rejected', 'duplicate']);
		expect(res[0].reason).toBe('not_found');
		expect(res[1].firstStatus).toBe('applied');
		// And the ledger keeps those answers: sent once more, both are duplicates of them.
		const again = await push(techC, 'phone-a', [late, stored]);
		expect(again.map((r) => `${r.status}:${r.firstStatus}`)).toEqual(['duplicate:rejected', 'duplicate:applied']);
	});

	it('evicts a reassigned job from the old assignee and sends it to the new one', async () => {
		const w = await makeWorkshop('Evict');
		const l = w.users.lead.actor;
		const j = await jobs.create(l, { complaint: 'Moves', assigneeId: w.users.technician.id });
		const techC = await signedIn(w.users.technician.email);
		const appC = await signedIn(w.users.apprentice.email);
		const t = create('test', { jobId: j.id });
		await push(techC, 'phone-a', [t, create('reading', { testId: t.entityId, checkKey: 'primary', samples: [{ value: 0.5, unit: 'Ω' }] })]);
		const before = await pullAll(techC);
		const appBefore = await pullAll(appC);
		expect(appBefore.changes.map((x) => x.entityId)).not.toContain(j.id);
		await jobs.update(l, j.id as string, (await Job.findByPk(j.id as string))!.version, { assigneeId: w.users.apprentice.id });
		const techAfter = await pullAll(techC, before.cursor);
		expect(techAfter.changes.find((x) => x.entityId === j.id)?.op).toBe('evict');
		const appAfter = await pullAll(appC, appBefore.cursor);
		const got = appAfter.changes.map((x) => `${x.entity}:${x.op}`);
		expect(got).toEqual(expect.arrayContaining(['job:upsert', 'test:upsert', 'reading:upsert']));
	});
});
