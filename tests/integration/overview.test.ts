/**
 * The lead's overview through the JSON API, the CSV export and the page, on a small
 * workshop whose every figure is worked out by hand below. Tests and readings arrive the
 * way phones send them (sync push); one test is moved 200 days back to check the dates.
 *
 * Verdicts (cold spec 0.36–0.55 Ω at 20 °C; leads subtracted; meter ±(0.5 % + 2 counts of
 * 0.01 Ω) on the 200 Ω range — the ±(% of reading + counts) form of a meter's accuracy
 * table, as in DESIGN §4 `uncertainty`):
 *  - 0.55 Ω read with 0.10 Ω leads → 0.45 Ω, ±0.0223: inside → OK
 *  - 0.80 Ω − 0.10 → 0.70 Ω: above 0.55 → out of spec
 *  - 0.65 Ω − 0.10 → 0.55 Ω, ±0.0228 straddles 0.55 → can't tell
 *  - 0.70 Ω on the 20 kΩ range (±30 Ω) − 0.20 → straddles both limits → can't tell; that range
 *    cannot resolve the spec (its uncertainty is far beyond a quarter of the spec's half-width,
 *    the 4:1 ratio of ANSI/NCSL Z540.3 used by `canResolve`)
 *  - 0.45 Ω in relative mode (nothing subtracted) → OK
 */
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { parseCsv } from '../../src/lib/csv';
import { db } from '../../src/lib/server/db';
import { jobs } from '../../src/lib/server/services/jobs';
import {
	fillRangeUnresolved,
	fillTestSummaries
} from '../../migrations/2026-12-02T04-00-lead-desk';
import { deskWorkshop, meter } from '../helpers/desk';
import { create, op, push } from '../helpers/sync';

const base = inject('baseURL');
let w: Awaited<ReturnType<typeof deskWorkshop>>;
let other: Awaited<ReturnType<typeof deskWorkshop>>;
const PN_A = 'OV-A-100';
const PN_B = 'OV-B-200';

const reading = (testId: string, raw: number, rangeLabel = '200 Ω') =>
	create('reading', {
		testId,
		checkKey: 'primary',
		position: '1',
		samples: [{ value: raw, unit: 'Ω' }],
		rangeLabel
	});

beforeAll(async () => {
	w = await deskWorkshop(base, 'Overview');
	other = await deskWorkshop(base, 'Overview elsewhere');
	const lead = w.users.lead.actor;
	const techJob = (
		await jobs.create(lead, { complaint: 'Misfire under load', assigneeId: w.users.technician.id })
	).id as string;
	const appJob = (
		await jobs.create(lead, { complaint: 'Rough idle', assigneeId: w.users.apprentice.id })
	).id as string;
	const test = (jobId: string, partNumber: string, m: object) =>
		create('test', {
			jobId,
			componentId: w.componentId,
			sheetId: w.sheetId,
			partNumber,
			position: '1',
			meter: m,
			temperature: { mode: 'measured', tempC: 20 }
		});
	const [t1, t2, t5, t6, t7] = [
		test(techJob, PN_A, meter('Meter One', 0.1)),
		test(techJob, PN_A, meter('Meter One', 0.1)),
		test(techJob, PN_B, meter('Meter Two', 0.2)),
		test(techJob, PN_B, meter('Meter Two', 0, true)),
		test(techJob, PN_A, meter('Meter One', 0.1))
	];
	const [t3, t4] = [
		test(appJob, PN_A, meter('Meter One', 0.1)),
		test(appJob, PN_B, meter('Meter Two', 0.2))
	];
	const techOps = [
		t1,
		t2,
		t5,
		t6,
		t7,
		reading(t1.entityId, 0.55),
		reading(t1.entityId, 0.55),
		reading(t2.entityId, 0.55),
		reading(t2.entityId, 0.8),
		reading(t6.entityId, 0.45),
		reading(t7.entityId, 0.8)
	];
	const done = (t: { entityId: string }) => op('test', 'patch', t.entityId, { state: 'done' }, 1);
	expect(
		(await push(w.as.technician, 'tech-phone', [...techOps, done(t1), done(t2)])).every(
			(r) => r.status === 'applied'
		)
	).toBe(true);
	const appOps = [t3, t4, reading(t3.entityId, 0.65), reading(t4.entityId, 0.7, '20 kΩ'), done(t4)];
	expect(
		(await push(w.as.apprentice, 'apprentice-phone', appOps)).every((r) => r.status === 'applied')
	).toBe(true);
	await db().query(
		'UPDATE tests SET created_at = UTC_TIMESTAMP(3) - INTERVAL 200 DAY WHERE id = ?',
		{ replacements: [t7.entityId], type: QueryTypes.UPDATE }
	);
	// Another workshop's test of the same part number never counts here.
	const theirJob = (
		await jobs.create(other.users.lead.actor, {
			complaint: 'Elsewhere',
			assigneeId: other.users.technician.id
		})
	).id as string;
	const theirs = create('test', {
		jobId: theirJob,
		componentId: other.componentId,
		sheetId: other.sheetId,
		partNumber: PN_A,
		position: '1',
		meter: meter('Meter One'),
		temperature: { mode: 'measured', tempC: 20 }
	});
	await push(other.as.technician, 'their-phone', [theirs, reading(theirs.entityId, 0.8)]);
});

const overview = async (qs = '') => {
	const r = await w.as.lead.get(`/api/overview${qs}`);
	expect(r.status).toBe(200);
	return r.json();
};

describe('the overview', () => {
	it('counts tests per part number: out of spec, can’t tell, OK and no result, over the last 90 days', async () => {
		const o = await overview();
		expect(o.bucket).toBe('week');
		const a = o.parts.find((r: { partNumber: string }) => r.partNumber === PN_A);
		const b = o.parts.find((r: { partNumber: string }) => r.partNumber === PN_B);
		// A: T1 OK, T2 out of spec, T3 can't tell (T7 is older than 90 days).
		expect(a).toEqual({
			partNumber: PN_A,
			tests: 3,
			outOfSpec: 1,
			cantTell: 1,
			ok: 1,
			noResult: 0,
			failRate: 1 / 3
		});
		// B: T4 can't tell, T5 not read, T6 OK.
		expect(b).toEqual({
			partNumber: PN_B,
			tests: 3,
			outOfSpec: 0,
			cantTell: 1,
			ok: 1,
			noResult: 1,
			failRate: 0
		});
		expect(o.parts).toHaveLength(2); // the other workshop's test is not here
	});

	it('takes the date range from the URL', async () => {
		const o = await overview('?from=2020-01-01');
		expect(o.parts.find((r: { partNumber: string }) => r.partNumber === PN_A)).toMatchObject({
			tests: 4,
			outOfSpec: 2
		});
		expect(o.bucket).toBe('month');
		const none = await overview('?from=2020-01-01&to=2020-12-31');
		expect(none.parts).toEqual([]);
	});

	it('gives each meter its readings, lead zero and how often its range could not resolve the spec', async () => {
		const o = await overview();
		const one = o.meters.find((r: { meterName: string }) => r.meterName === 'Meter One');
		const two = o.meters.find((r: { meterName: string }) => r.meterName === 'Meter Two');
		expect(one).toMatchObject({
			tests: 3,
			readings: 5,
			relativeTests: 0,
			unresolved: 0,
			unresolvedRate: 0
		});
		expect(one.leadAvg).toBeCloseTo(0.1, 12);
		// T4 (0.20 Ω, 20 kΩ range) and T5 (0.20 Ω, not read) subtract leads; T6 is relative mode.
		expect(two).toMatchObject({
			tests: 3,
			readings: 2,
			relativeTests: 1,
			unresolved: 1,
			unresolvedRate: 0.5
		});
		expect(two.leadAvg).toBeCloseTo(0.2, 12);
		const series = o.leadZero.find((s: { meterName: string }) => s.meterName === 'Meter Two');
		expect(series.points).toHaveLength(1);
		expect(series.points[0]).toMatchObject({ tests: 2 });
	});

	it('gives each person their tests, finished tests and can’t-tell rate, and filters by role', async () => {
		const o = await overview();
		const tech = o.people.find((r: { id: string }) => r.id === w.users.technician.id);
		const app = o.people.find((r: { id: string }) => r.id === w.users.apprentice.id);
		expect(tech).toMatchObject({
			role: 'technician',
			tests: 4,
			finished: 2,
			withResult: 3,
			cantTell: 0,
			cantTellRate: 0
		});
		expect(app).toMatchObject({
			role: 'apprentice',
			tests: 2,
			finished: 1,
			withResult: 2,
			cantTell: 2,
			cantTellRate: 1
		});
		expect((await overview('?role=apprentice')).people.map((r: { id: string }) => r.id)).toEqual([
			w.users.apprentice.id
		]);
	});

	it('sorts and filters each table through the URL', async () => {
		expect(
			(await overview('?partsSort=-failRate')).parts.map(
				(r: { partNumber: string }) => r.partNumber
			)
		).toEqual([PN_A, PN_B]);
		expect(
			(await overview('?partsSort=failRate')).parts.map((r: { partNumber: string }) => r.partNumber)
		).toEqual([PN_B, PN_A]);
		expect(
			(await overview('?part=b-2')).parts.map((r: { partNumber: string }) => r.partNumber)
		).toEqual([PN_B]);
		expect(
			(await overview('?meter=two')).meters.map((r: { meterName: string }) => r.meterName)
		).toEqual(['Meter Two']);
	});

	it('exports a table as CSV with `;` and decimal commas, or `,` and points', async () => {
		const r = await w.as.lead.get(
			'/api/overview/csv?table=parts&delimiter=semicolon&partsSort=part'
		);
		expect(r.status).toBe(200);
		expect(r.headers.get('content-type')).toContain('text/csv');
		expect(r.headers.get('content-disposition')).toMatch(
			/attachment; filename="fieldbench-parts-\d{4}-\d\d-\d\d-to-\d{4}-\d\d-\d\d\.csv"/
		);
		const bytes = new Uint8Array(await r.arrayBuffer());
		expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]); // the byte-order mark
		const text = new TextDecoder().decode(bytes);
		const rows = parseCsv(text).rows.map((x) => x.cells);
		expect(rows).toEqual([
			['part_number', 'tests', 'out_of_spec', 'cant_tell', 'ok', 'no_result', 'out_of_spec_pct'],
			[PN_A, '3', '1', '1', '1', '0', '33,3'],
			[PN_B, '3', '0', '1', '1', '1', '0']
		]);
		const meters = parseCsv(
			await (await w.as.lead.get('/api/overview/csv?table=meters&metersSort=meter')).text()
		).rows.map((x) => x.cells);
		expect(meters[2]).toEqual(['Meter Two', '3', '2', '1', '0.2', '0.2', '0.2', '0.2', '1', '50']);
	});

	it('fills the range flag of readings stored before it existed as the sync path does (migration)', async () => {
		const flags = () =>
			db().query<{ id: string; range_unresolved: number | null; server_verdict: string }>(
				'SELECT id, range_unresolved, server_verdict FROM readings WHERE workshop_id = ? ORDER BY id',
				{ replacements: [w.workshop.id], type: QueryTypes.SELECT }
			);
		const stored = await flags();
		expect(stored.map((r) => r.range_unresolved).sort()).toEqual([0, 0, 0, 0, 0, 0, 0, 1]);
		await db().query('UPDATE readings SET range_unresolved = NULL WHERE workshop_id = ?', {
			replacements: [w.workshop.id],
			type: QueryTypes.UPDATE
		});
		expect(await fillRangeUnresolved(db(), 3)).toBeGreaterThanOrEqual(8);
		expect(await flags()).toEqual(stored);
	});

	it('keeps one summary per test that adds up its readings as they arrive, the same as summarising them afresh (migration)', async () => {
		const summaries = () =>
			db().query<Record<string, unknown>>(
				'SELECT test_id, readings, out_of_spec, cant_tell, ok, unresolved, range_known FROM test_summaries WHERE workshop_id = ? ORDER BY test_id',
				{ replacements: [w.workshop.id], type: QueryTypes.SELECT }
			);
		const kept = await summaries();
		// Seven tests, six of them read: 2 + 2 + 1 + 1 + 1 (T7) + 1 (T3) readings, one per reading's verdict.
		expect(kept).toHaveLength(6);
		expect(kept.reduce((n, r) => n + Number(r.readings), 0)).toBe(8);
		expect(kept.reduce((n, r) => n + Number(r.out_of_spec), 0)).toBe(2);
		const ids = kept.map((r) => String(r.test_id));
		await db().query('DELETE FROM test_summaries WHERE test_id IN (?)', {
			replacements: [ids],
			type: QueryTypes.DELETE
		});
		await fillTestSummaries(db(), ids);
		expect(await summaries()).toEqual(kept);
	});

	it('refuses a wrong query with the field named, and the overview to anyone but leads and owners', async () => {
		const bad = await w.as.lead.get('/api/overview?from=2026-13-40');
		expect(bad.status).toBe(400);
		expect((await bad.json()).error.fields.from).toBeTruthy();
		const reversed = await w.as.lead.get('/api/overview?from=2026-12-01&to=2026-11-01');
		expect((await reversed.json()).error.fields.from).toBe('The start is after the end');
		expect((await w.as.lead.get('/api/overview/csv?table=nope')).status).toBe(400);
		expect((await w.as.technician.get('/api/overview')).status).toBe(403);
		expect((await w.as.apprentice.get('/api/overview/csv?table=parts')).status).toBe(403);
		expect((await w.as.owner.get('/api/overview')).status).toBe(200);
	});

	it('renders the page for a lead, sorted as the URL says, and keeps others out', async () => {
		const r = await w.as.lead.get('/overview?partsSort=part', 'text/html');
		expect(r.status).toBe(200);
		const html = await r.text();
		expect(html).toContain('Part numbers');
		expect(html.indexOf(PN_A)).toBeLessThan(html.indexOf(PN_B));
		expect(html).toContain('aria-sort="ascending"');
		expect((await w.as.technician.get('/overview', 'text/html')).status).toBe(403);
	});
});
