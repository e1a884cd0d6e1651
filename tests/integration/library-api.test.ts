/**
 * The spec library's JSON API against the built app and MariaDB: components, sheets,
 * approval, immutability of approved versions, and the CSV import/export. Part numbers and
 * figures are invented; limits travel in base units (Ω).
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { makeWorkshop } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { clientOf, type Role, type Workshop } from '../helpers/records';

const base = inject('baseURL');
let a: Workshop;
let b: Workshop;

const tag = () => uuidv7().slice(-8).toUpperCase();
const check = (over: Record<string, unknown> = {}) => ({
	key: 'primary',
	label: 'Primary winding',
	quantity: 'resistance',
	from: '1',
	to: '2',
	condition: 'key_off',
	rangeHint: '200 Ω',
	unit: 'Ω',
	openOk: false,
	bands: [
		{ fromC: null, toC: 50, min: 0.4, max: 0.6 },
		{ fromC: 50, toC: 100, min: 0.5, max: 0.7 }
	],
	...over
});

async function body(r: Response) {
	return (await r.json()) as Record<string, any>;
}
async function newComponent(w: Workshop, over: Record<string, unknown> = {}, role: Role = 'lead') {
	const r = await (
		await clientOf(w, role)
	).json('POST', '/api/components', {
		partNumber: `TT-IC-${tag()}`,
		kind: 'ignition_coil',
		...over
	});
	expect(r.status).toBe(201);
	return (await body(r)).component;
}
async function newDraft(
	w: Workshop,
	componentId: string,
	checks: unknown[] = [check()],
	role: Role = 'technician'
) {
	const r = await (await clientOf(w, role)).json('POST', '/api/sheets', { componentId, checks });
	expect(r.status).toBe(201);
	return (await body(r)).sheet;
}
async function approve(w: Workshop, sheet: { id: string; version: number }, role: Role = 'lead') {
	return (await clientOf(w, role)).json('POST', `/api/sheets/${sheet.id}/approve`, {
		baseVersion: sheet.version
	});
}
async function changeCount(workshopId: string) {
	const [r] = await db().query<{ n: number | bigint }>(
		'SELECT COUNT(*) AS n FROM changes WHERE workshop_id = ?',
		{ replacements: [workshopId], type: QueryTypes.SELECT }
	);
	return Number(r.n);
}

beforeAll(async () => {
	a = await makeWorkshop('Library A');
	b = await makeWorkshop('Library B');
});

describe('components', () => {
	it('adds a component with fitment, cautions and the cylinders each coil of a pack serves', async () => {
		const c = await newComponent(a, {
			kind: 'coil_pack',
			description: 'Waste-spark pack',
			fitment: [
				{ make: 'Corvane', model: 'Pica', yearFrom: 2014, yearTo: 2018, engineCode: 'CV14N' }
			],
			cautions: ['high_voltage'],
			positions: [
				{ position: 'A', cylinders: [1, 4] },
				{ position: 'B', cylinders: [2, 3] }
			]
		});
		expect(c).toMatchObject({ version: 1, kind: 'coil_pack', cautions: ['high_voltage'] });
		expect(c.positions).toEqual([
			{ position: 'A', cylinders: [1, 4] },
			{ position: 'B', cylinders: [2, 3] }
		]);
		const r = await (await clientOf(a, 'apprentice')).get(`/api/components/${c.id}`);
		expect(r.status).toBe(200);
		expect((await body(r)).component.positions[0].cylinders).toEqual([1, 4]);
	});

	it('refuses invalid fields with 400 naming each field', async () => {
		const r = await (
			await clientOf(a, 'technician')
		).json('POST', '/api/components', {
			partNumber: '',
			kind: 'ignition_coil',
			fitment: [{ make: 'Corvane', model: 'Brisel', yearFrom: 2020, yearTo: 2017 }]
		});
		expect(r.status).toBe(400);
		const e = (await body(r)).error;
		expect(e.code).toBe('invalid');
		expect(Object.keys(e.fields).sort()).toEqual(['fitment.0.yearTo', 'partNumber']);
	});

	it('refuses a part number already in the library, whatever its letter case', async () => {
		const c = await newComponent(a);
		const r = await (
			await clientOf(a, 'technician')
		).json('POST', '/api/components', {
			partNumber: c.partNumber.toLowerCase(),
			kind: 'relay'
		});
		expect(r.status).toBe(400);
		expect((await body(r)).error.fields.partNumber).toContain('already in the library');
	});

	it('lets another workshop use the same part number, and hides each workshop’s component from the other (404)', async () => {
		const c = await newComponent(a);
		await newComponent(b, { partNumber: c.partNumber });
		const r = await (await clientOf(b, 'lead')).get(`/api/components/${c.id}`);
		expect(r.status).toBe(404);
		expect((await body(r)).error.code).toBe('not_found');
		const patch = await (
			await clientOf(b, 'lead')
		).json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			description: 'x'
		});
		expect(patch.status).toBe(404);
		expect((await (await clientOf(a, 'lead')).get('/api/components/not-a-uuid')).status).toBe(404);
	});

	it('changes a component at the version seen, and answers a stale version with 409 and the current record', async () => {
		const c = await newComponent(a);
		const tech = await clientOf(a, 'technician');
		const r1 = await tech.json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			description: 'First'
		});
		expect(r1.status).toBe(200);
		expect((await body(r1)).component).toMatchObject({ version: 2, description: 'First' });
		const r2 = await tech.json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			description: 'Late'
		});
		expect(r2.status).toBe(409);
		const e = (await body(r2)).error;
		expect(e.code).toBe('stale_version');
		expect(e.current).toMatchObject({ id: c.id, version: 2, description: 'First' });
	});

	it('keeps the fields a patch does not send (no defaults fill in)', async () => {
		const c = await newComponent(a, {
			fitment: [{ make: 'Corvane', model: 'Brisel' }],
			cautions: ['fuel']
		});
		const r = await (
			await clientOf(a, 'technician')
		).json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			description: 'Only this'
		});
		expect((await body(r)).component).toMatchObject({
			fitment: [{ make: 'Corvane', model: 'Brisel' }],
			cautions: ['fuel']
		});
	});

	it('refuses a patch without baseVersion or with bad fields (400 naming them)', async () => {
		const c = await newComponent(a);
		const tech = await clientOf(a, 'technician');
		const r1 = await tech.json('PATCH', `/api/components/${c.id}`, { description: 'x' });
		expect(r1.status).toBe(400);
		expect((await body(r1)).error.fields).toHaveProperty('baseVersion');
		const r2 = await tech.json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			positions: [{ position: 'A', cylinders: [1, 1] }]
		});
		expect(r2.status).toBe(400);
		expect((await body(r2)).error.fields).toHaveProperty('positions.0.cylinders');
		const r3 = await tech.json('PATCH', `/api/components/${c.id}`, '{"baseVersion": 1,');
		expect(r3.status).toBe(400);
	});

	it('lets a technician add a caution but only a lead remove one (403)', async () => {
		const c = await newComponent(a, { kind: 'other', cautions: ['airbag'] });
		const tech = await clientOf(a, 'technician');
		const refused = await tech.json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			cautions: []
		});
		expect(refused.status).toBe(403);
		expect((await body(refused)).error.code).toBe('forbidden');
		const added = await tech.json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 1,
			cautions: ['airbag', 'hot_surface']
		});
		expect(added.status).toBe(200);
		const removed = await (
			await clientOf(a, 'lead')
		).json('PATCH', `/api/components/${c.id}`, {
			baseVersion: 2,
			cautions: ['hot_surface']
		});
		expect(removed.status).toBe(200);
		expect((await body(removed)).component.cautions).toEqual(['hot_surface']);
	});

	it('answers 401 when signed out', async () => {
		const r = await new Client(base, '10.6.250.1').get('/api/components');
		expect(r.status).toBe(401);
		expect((await body(r)).error.code).toBe('signed_out');
	});
});

describe('the library list', () => {
	let w: Workshop;
	const ids: Record<string, string> = {};
	beforeAll(async () => {
		w = await makeWorkshop('Library list');
		const add = async (partNumber: string, kind: string, fitment: unknown[] = []) =>
			(ids[partNumber] = (await newComponent(w, { partNumber, kind, fitment })).id);
		await add('LL-100', 'ignition_coil', [
			{ make: 'Corvane', model: 'Brisel', yearFrom: 2017, yearTo: 2022, engineCode: 'CV16T' }
		]);
		await add('LL-200', 'coil_pack', [{ make: 'Tessaly', model: 'Ondrava', yearFrom: 2020 }]);
		await add('LL-300', 'relay');
		await add('LL-400', 'ignition_coil', [
			{ make: 'Corvane', model: 'Pica', yearFrom: 2012, yearTo: 2016 }
		]);
		const s = await newDraft(w, ids['LL-100']);
		expect((await approve(w, s)).status).toBe(200);
		await newDraft(w, ids['LL-200']);
	});
	const list = async (q: string) =>
		body(await (await clientOf(w, 'apprentice')).get(`/api/components?${q}`));
	const parts = (p: Record<string, any>) =>
		p.items.map((i: { partNumber: string }) => i.partNumber);

	it('pages through the workshop’s components in part-number order', async () => {
		const p1 = await list('pageSize=3');
		expect(p1).toMatchObject({ total: 4, page: 1, pageSize: 3 });
		expect(parts(p1)).toEqual(['LL-100', 'LL-200', 'LL-300']);
		expect(parts(await list('pageSize=3&page=2'))).toEqual(['LL-400']);
	});

	it('sorts descending with a leading -', async () => {
		expect(parts(await list('sort=-partNumber'))).toEqual(['LL-400', 'LL-300', 'LL-200', 'LL-100']);
	});

	it('filters by kind', async () => {
		expect(parts(await list('kind=ignition_coil'))).toEqual(['LL-100', 'LL-400']);
	});

	it('searches the part number, the vehicle’s make and model, the engine code and a year fitted', async () => {
		expect(parts(await list('q=ll-3'))).toEqual(['LL-300']);
		expect(parts(await list('q=corvane'))).toEqual(['LL-100', 'LL-400']);
		expect(parts(await list('q=Corvane%20Brisel'))).toEqual(['LL-100']);
		expect(parts(await list('q=cv16t'))).toEqual(['LL-100']);
		expect(parts(await list('q=corvane%202015'))).toEqual(['LL-400']);
		expect(parts(await list('q=make'))).toEqual([]); // JSON keys are not searched
	});

	it('filters by the state of the sheets and shows the newest approved and draft versions', async () => {
		const approved = await list('sheets=approved');
		expect(parts(approved)).toEqual(['LL-100']);
		expect(approved.items[0]).toMatchObject({ approvedVersion: 1, draftVersion: null });
		const drafts = await list('sheets=draft');
		expect(parts(drafts)).toEqual(['LL-200']);
		expect(drafts.items[0]).toMatchObject({ approvedVersion: null, draftVersion: 1 });
		expect(parts(await list('sheets=none'))).toEqual(['LL-300', 'LL-400']);
	});

	it('refuses a bad query with 400 naming the parameter', async () => {
		const r = await (await clientOf(w, 'lead')).get('/api/components?pageSize=500&kind=widget');
		expect(r.status).toBe(400);
		expect(Object.keys((await body(r)).error.fields).sort()).toEqual(['kind', 'pageSize']);
	});
});

describe('spec sheets', () => {
	it('lets an apprentice start a draft: version 1, then 2, in the draft state', async () => {
		const c = await newComponent(a);
		const s1 = await newDraft(a, c.id, [check()], 'apprentice');
		expect(s1).toMatchObject({ sheetVersion: 1, state: 'draft', version: 1, componentId: c.id });
		const s2 = await newDraft(a, c.id, [check()], 'apprentice');
		expect(s2.sheetVersion).toBe(2);
		const r = await (await clientOf(a, 'technician')).get(`/api/sheets/${s1.id}`);
		expect(r.status).toBe(200);
		const got = await body(r);
		expect(got.sheet.checks[0].bands).toEqual(check().bands);
		expect(got.component.id).toBe(c.id);
		const listed = await body(
			await (await clientOf(a, 'technician')).get(`/api/sheets?componentId=${c.id}`)
		);
		expect(listed.items.map((s: { sheetVersion: number }) => s.sheetVersion)).toEqual([2, 1]);
		expect(listed.total).toBe(2);
	});

	it.each([
		[
			'overlapping bands',
			check({
				bands: [
					{ fromC: null, toC: 50, min: 0.4, max: 0.6 },
					{ fromC: 40, toC: 100, min: 0.5, max: 0.7 }
				]
			}),
			'checks.1.bands.1.fromC'
		],
		[
			'a min above the max',
			check({ bands: [{ fromC: null, toC: null, min: 0.7, max: 0.6 }] }),
			'checks.1.bands.0.max'
		],
		['a unit that does not fit', check({ unit: 'V' }), 'checks.1.unit']
	])('refuses %s with 400 naming the field', async (_, bad, field) => {
		const c = await newComponent(a);
		const r = await (
			await clientOf(a, 'technician')
		).json('POST', '/api/sheets', {
			componentId: c.id,
			checks: [check({ key: 'first' }), bad]
		});
		expect(r.status).toBe(400);
		const e = (await body(r)).error;
		expect(Object.keys(e.fields)).toEqual([field]);
	});

	it('does not start a draft for another workshop’s component (404), nor show another workshop’s sheet', async () => {
		const c = await newComponent(a);
		const s = await newDraft(a, c.id);
		const r = await (
			await clientOf(b, 'lead')
		).json('POST', '/api/sheets', { componentId: c.id, checks: [check()] });
		expect(r.status).toBe(404);
		expect((await (await clientOf(b, 'lead')).get(`/api/sheets/${s.id}`)).status).toBe(404);
		const patch = await (
			await clientOf(b, 'lead')
		).json('PATCH', `/api/sheets/${s.id}`, {
			baseVersion: 1,
			source: { document: 'x' }
		});
		expect(patch.status).toBe(404);
		const listed = await body(
			await (await clientOf(b, 'lead')).get(`/api/sheets?componentId=${c.id}`)
		);
		expect(listed.total).toBe(0);
	});

	it('edits a draft at the version seen; a stale version is 409 with the current record', async () => {
		const c = await newComponent(a);
		const s = await newDraft(a, c.id);
		const tech = await clientOf(a, 'technician');
		const r1 = await tech.json('PATCH', `/api/sheets/${s.id}`, {
			baseVersion: 1,
			source: { document: 'Invented data sheet', section: '2', page: '7' }
		});
		expect(r1.status).toBe(200);
		expect((await body(r1)).sheet).toMatchObject({ version: 2, sheetVersion: 1 });
		const r2 = await tech.json('PATCH', `/api/sheets/${s.id}`, {
			baseVersion: 1,
			checks: [check({ label: 'Late' })]
		});
		expect(r2.status).toBe(409);
		const e = (await body(r2)).error;
		expect(e.code).toBe('stale_version');
		expect(e.current).toMatchObject({
			id: s.id,
			version: 2,
			source: { document: 'Invented data sheet' }
		});
		const r3 = await tech.json('PATCH', `/api/sheets/${s.id}`, {
			baseVersion: 2,
			checks: [check({ bands: [{ fromC: null, toC: null, min: 2, max: 1 }] })]
		});
		expect(r3.status).toBe(400);
		expect((await body(r3)).error.fields).toHaveProperty(['checks.0.bands.0.max']);
	});
});

describe('approval', () => {
	it.each(['apprentice', 'technician'] as const)(
		'refuses the %s approving (403) and leaves the draft as it was',
		async (role) => {
			const c = await newComponent(a);
			const s = await newDraft(a, c.id);
			const r = await approve(a, s, role);
			expect(r.status).toBe(403);
			expect((await body(r)).error.code).toBe('forbidden');
			expect(
				(await body(await (await clientOf(a, 'lead')).get(`/api/sheets/${s.id}`))).sheet.state
			).toBe('draft');
		}
	);

	it('lets a lead approve the draft they saw, recording who and when', async () => {
		const c = await newComponent(a);
		const s = await newDraft(a, c.id);
		const r = await approve(a, s, 'lead');
		expect(r.status).toBe(200);
		const sheet = (await body(r)).sheet;
		expect(sheet).toMatchObject({ state: 'approved', approvedBy: a.users.lead.id, version: 2 });
		expect(Date.parse(sheet.approvedAt)).toBeGreaterThan(Date.now() - 60_000);
		const summary = await body(
			await (await clientOf(a, 'apprentice')).get(`/api/components/${c.id}`)
		);
		expect(summary.sheets[0]).toMatchObject({
			sheetVersion: 1,
			state: 'approved',
			approvedBy: { id: a.users.lead.id }
		});
	});

	it('lets an owner approve too', async () => {
		const c = await newComponent(a);
		expect((await approve(a, await newDraft(a, c.id), 'owner')).status).toBe(200);
	});

	it('refuses to approve a draft that changed since the lead saw it (409 with the current record)', async () => {
		const c = await newComponent(a);
		const s = await newDraft(a, c.id);
		await (
			await clientOf(a, 'technician')
		).json('PATCH', `/api/sheets/${s.id}`, {
			baseVersion: 1,
			checks: [check({ label: 'Changed' })]
		});
		const r = await approve(a, s, 'lead');
		expect(r.status).toBe(409);
		expect((await body(r)).error.current).toMatchObject({ version: 2, state: 'draft' });
	});

	it('answers 404 for another workshop’s sheet', async () => {
		const c = await newComponent(a);
		const s = await newDraft(a, c.id);
		expect((await approve(b, s, 'lead')).status).toBe(404);
	});
});

describe('an approved version never changes', () => {
	let c: { id: string };
	let v1: { id: string; version: number; checks: unknown[] };
	beforeAll(async () => {
		c = await newComponent(a);
		const draft = await newDraft(a, c.id);
		v1 = (await body(await approve(a, draft))).sheet;
	});

	it('refuses an edit with 409 sheet_approved, carrying the approved record, and keeps it as it was', async () => {
		const r = await (
			await clientOf(a, 'lead')
		).json('PATCH', `/api/sheets/${v1.id}`, {
			baseVersion: v1.version,
			checks: [check({ bands: [{ fromC: null, toC: null, min: 0.1, max: 0.9 }] })]
		});
		expect(r.status).toBe(409);
		const e = (await body(r)).error;
		expect(e.code).toBe('sheet_approved');
		expect(e.current).toMatchObject({ id: v1.id, state: 'approved', version: v1.version });
		const now = (await body(await (await clientOf(a, 'lead')).get(`/api/sheets/${v1.id}`))).sheet;
		expect(now.checks).toEqual(v1.checks);
		expect(now.version).toBe(v1.version);
	});

	it('refuses to discard it or approve it again', async () => {
		const del = await (
			await clientOf(a, 'lead')
		).json('DELETE', `/api/sheets/${v1.id}`, { baseVersion: v1.version });
		expect(del.status).toBe(409);
		expect((await approve(a, v1)).status).toBe(409);
	});

	it('starts the next draft from it: version 2 with the same checks, version 1 untouched', async () => {
		const r = await (
			await clientOf(a, 'apprentice')
		).json('POST', `/api/sheets/${v1.id}/next-draft`, {});
		expect(r.status).toBe(201);
		const v2 = (await body(r)).sheet;
		expect(v2).toMatchObject({ sheetVersion: 2, state: 'draft', componentId: c.id, version: 1 });
		expect(v2.checks).toEqual(v1.checks);
		const edited = await (
			await clientOf(a, 'apprentice')
		).json('PATCH', `/api/sheets/${v2.id}`, {
			baseVersion: 1,
			checks: [check({ bands: [{ fromC: null, toC: 50, min: 0.41, max: 0.61 }] })]
		});
		expect(edited.status).toBe(200);
		expect(
			(await body(await (await clientOf(a, 'lead')).get(`/api/sheets/${v1.id}`))).sheet.checks
		).toEqual(v1.checks);
		expect(
			(await (await clientOf(b, 'lead')).json('POST', `/api/sheets/${v1.id}/next-draft`, {})).status
		).toBe(404);
	});

	it('refuses to approve an older draft once a newer version is approved (409 superseded)', async () => {
		const comp = await newComponent(a);
		const older = await newDraft(a, comp.id);
		const newer = await newDraft(a, comp.id);
		expect((await approve(a, newer)).status).toBe(200);
		const r = await approve(a, older);
		expect(r.status).toBe(409);
		expect((await body(r)).error).toMatchObject({
			code: 'superseded',
			current: { sheetVersion: 2 }
		});
	});
});

describe('discarding a draft', () => {
	it('lets its author discard it, refuses another technician (403), and lets a lead', async () => {
		const c = await newComponent(a);
		const mine = await newDraft(a, c.id, [check()], 'apprentice');
		const refused = await (
			await clientOf(a, 'technician')
		).json('DELETE', `/api/sheets/${mine.id}`, { baseVersion: 1 });
		expect(refused.status).toBe(403);
		const ok = await (
			await clientOf(a, 'apprentice')
		).json('DELETE', `/api/sheets/${mine.id}`, { baseVersion: 1 });
		expect(ok.status).toBe(200);
		expect((await (await clientOf(a, 'apprentice')).get(`/api/sheets/${mine.id}`)).status).toBe(
			404
		);
		const other = await newDraft(a, c.id, [check()], 'apprentice');
		expect(other.sheetVersion).toBe(2); // a discarded version number is never reused
		const byLead = await (
			await clientOf(a, 'lead')
		).json('DELETE', `/api/sheets/${other.id}`, { baseVersion: 1 });
		expect(byLead.status).toBe(200);
	});
});

describe('CSV import and export', () => {
	let src: Workshop;
	beforeAll(async () => {
		src = await makeWorkshop('CSV source');
		const pack = await newComponent(src, {
			partNumber: 'CSV-CP-0001',
			kind: 'coil_pack',
			description: 'Four-tower pack; "waste spark", two coils',
			fitment: [
				{ make: 'Corvane', model: 'Pica', yearFrom: 2014, yearTo: 2018, engineCode: 'CV14N' },
				{ make: 'Corvane', model: 'Pica Van', yearFrom: 2016 }
			],
			cautions: ['high_voltage', 'hot_surface'],
			positions: [
				{ position: 'A', cylinders: [1, 4] },
				{ position: 'B', cylinders: [2, 3] }
			]
		});
		const v1 = await newDraft(src, pack.id, [
			check({ from: '+', to: '-' }),
			check({
				key: 'secondary',
				label: 'Secondary winding, A',
				unit: 'kΩ',
				openOk: true,
				bands: [{ fromC: -20, toC: 50, min: 8800, max: 14600 }]
			}),
			{ key: 'look', label: 'Cracks or tracking', quantity: 'visual', condition: 'key_off' },
			{
				key: 'spark',
				label: 'Spark at the tester gap',
				quantity: 'spark',
				condition: 'cranking',
				unit: 'mm',
				bands: [{ fromC: null, toC: null, min: 0.007, max: null }]
			}
		]);
		const lead = await clientOf(src, 'lead');
		await lead.json('PATCH', `/api/sheets/${v1.id}`, {
			baseVersion: 1,
			source: { document: 'Invented data sheet', section: '3.2', page: '11' }
		});
		expect((await approve(src, { id: v1.id, version: 2 })).status).toBe(200);
		const next = await body(await lead.json('POST', `/api/sheets/${v1.id}/next-draft`, {}));
		expect(next.sheet.sheetVersion).toBe(2);
		await newComponent(src, { partNumber: 'CSV-RL-0002', kind: 'relay' });
	});

	const exportOf = async (w: Workshop, q = '') => {
		const r = await (await clientOf(w, 'technician')).get(`/api/components/csv${q}`, 'text/csv');
		expect(r.status).toBe(200);
		expect(r.headers.get('content-type')).toMatch(/^text\/csv/);
		return r.text();
	};
	const importInto = async (w: Workshop, text: string, role: Role = 'lead', type = 'text/csv') =>
		fetch(`${base}/api/components/csv`, {
			method: 'POST',
			headers: (await clientOf(w, role)).headers({
				'content-type': type,
				accept: 'application/json'
			}),
			body: text
		});

	it('exports the workshop’s library in its own layout, limits in the check’s unit', async () => {
		const r = await (await clientOf(src, 'apprentice')).get('/api/components/csv', 'text/csv');
		const bytes = new Uint8Array(await r.arrayBuffer());
		expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]); // UTF-8 byte-order mark, for spreadsheets
		expect(r.headers.get('content-disposition')).toMatch(
			/attachment; filename="fieldbench-spec-library-/
		);
		const text = await exportOf(src);
		expect(text.startsWith('record,part_number,kind,')).toBe(true);
		expect(text).toContain('coil,CSV-CP-0001,,,,,,,,,A,1 4,');
		expect(text).toContain(',secondary,,,,,,,,,-20,50,8.8,14.6\r\n'); // 8800 Ω in kΩ
		expect(text).toContain(',spark,,,,,,,,,,,7,\r\n'); // 0.007 m in mm
		expect(text).not.toContain('TT-IC-'); // nothing of other workshops
	});

	it('round-trips: export → import into another workshop → export gives the same file', async () => {
		const first = await exportOf(src);
		const dest = await makeWorkshop('CSV dest');
		const r = await importInto(dest, first);
		expect(r.status).toBe(200);
		expect((await body(r)).imported).toEqual({
			components: { created: 2, updated: 0, unchanged: 0 },
			sheets: { created: 2, updated: 0, approved: 0, unchanged: 0 }
		});
		expect(await exportOf(dest)).toBe(first);
		const listed = await body(
			await (await clientOf(dest, 'technician')).get('/api/components?q=CSV-CP-0001')
		);
		expect(listed.items[0]).toMatchObject({ approvedVersion: 1, draftVersion: 2 });
		// Importing the same file again changes nothing.
		const again = await importInto(dest, first);
		expect((await body(again)).imported).toEqual({
			components: { created: 0, updated: 0, unchanged: 2 },
			sheets: { created: 0, updated: 0, approved: 0, unchanged: 2 }
		});
	});

	it('exports and reads back semicolons with decimal commas', async () => {
		const text = await exportOf(src, '?delimiter=semicolon');
		expect(text).toContain(';secondary;;;;;;;;;-20;50;8,8;14,6\r\n');
		const dest = await makeWorkshop('CSV semicolon');
		expect((await importInto(dest, text)).status).toBe(200);
		expect(await exportOf(dest)).toBe(await exportOf(src));
	});

	it('accepts a hand-made ; file with decimal commas and stores base units (0,38 Ω; 8,8 kΩ → 8800 Ω)', async () => {
		const dest = await makeWorkshop('CSV hand-made');
		const text = [
			'record;part_number;kind;sheet_version;state;check_key;check_label;quantity;condition;unit;from_c;to_c;min;max',
			'component;HM-IC-0001;ignition_coil;;;;;;;;;;;',
			'sheet;HM-IC-0001;;1;approved;;;;;;;;;',
			'check;HM-IC-0001;;1;;p;Primary winding;resistance;key_off;Ω;;;;',
			'limits;HM-IC-0001;;1;;p;;;;;;50;0,38;0,58',
			'check;HM-IC-0001;;1;;s;Secondary winding;resistance;key_off;kΩ;;;;',
			'limits;HM-IC-0001;;1;;s;;;;;;50;8,8;14,6'
		].join('\n');
		const r = await importInto(dest, text);
		expect(r.status).toBe(200);
		const list = await body(
			await (await clientOf(dest, 'technician')).get('/api/sheets?state=approved')
		);
		expect(list.items[0].approvedBy).toBe(dest.users.lead.id);
		const bands = list.items[0].checks.map((c: { bands: unknown[] }) => c.bands[0]);
		expect(bands).toEqual([
			{ fromC: null, toC: 50, min: 0.38, max: 0.58 },
			{ fromC: null, toC: 50, min: 8800, max: 14600 }
		]);
	});

	it('refuses a file with a bad line: reports line and column, and imports nothing of it', async () => {
		const dest = await makeWorkshop('CSV bad');
		const before = await changeCount(dest.workshop.id);
		const lines = (await exportOf(src)).split('\r\n');
		const i = lines.findIndex((l) => l.startsWith('limits,') && l.includes(',secondary,'));
		lines[i] = lines[i].replace(',8.8,14.6', ',15,14.6'); // min above max
		const r = await importInto(dest, lines.join('\r\n'));
		expect(r.status).toBe(400);
		const e = (await body(r)).error;
		expect(e.code).toBe('invalid');
		expect(e.lines).toEqual([{ line: i + 1, column: 'max', message: 'Max is below min' }]);
		expect(e.message).toContain(`Line ${i + 1}, column max`);
		expect(e.fields).toHaveProperty([`line.${i + 1}.max`]);
		expect(await changeCount(dest.workshop.id)).toBe(before);
		const listed = await body(await (await clientOf(dest, 'lead')).get('/api/components'));
		expect(listed.total).toBe(0);
	});

	it('rolls back every component of a file when a later one fails in the database', async () => {
		const dest = await makeWorkshop('CSV rollback');
		const approvedThere = await newComponent(dest, { partNumber: 'RB-IC-0002' });
		await approve(dest, await newDraft(dest, approvedThere.id));
		const before = await changeCount(dest.workshop.id);
		const text = [
			'record,part_number,kind,sheet_version,state,check_key,check_label,quantity,condition,unit,to_c,min,max',
			'component,RB-IC-0001,ignition_coil,,,,,,,,,,',
			'component,RB-IC-0002,ignition_coil,,,,,,,,,,',
			'sheet,RB-IC-0002,,1,approved,,,,,,,,',
			'check,RB-IC-0002,,1,,primary,Primary winding,resistance,key_off,Ω,,,',
			'limits,RB-IC-0002,,1,,primary,,,,,50,0.3,0.5'
		].join('\n');
		const r = await importInto(dest, text);
		expect(r.status).toBe(400);
		expect((await body(r)).error.lines).toEqual([
			expect.objectContaining({ line: 4, column: 'sheet_version' })
		]);
		expect(await changeCount(dest.workshop.id)).toBe(before);
		const listed = await body(
			await (await clientOf(dest, 'lead')).get('/api/components?q=RB-IC-0001')
		);
		expect(listed.total).toBe(0);
	});

	it('lets only leads and owners import (403), and wants text/csv', async () => {
		const text = await exportOf(src);
		expect((await importInto(b, text, 'technician')).status).toBe(403);
		expect((await importInto(b, text, 'apprentice')).status).toBe(403);
		const json = await importInto(b, text, 'lead', 'application/json');
		expect(json.status).toBe(400);
	});
});
