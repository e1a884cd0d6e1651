/**
 * A job's tests as the office page, the JSON API and a lead see them: sent by a phone, every
 * reading with its samples, the phone's result beside the workshop's recomputed one and a
 * flag where they differ, the cylinder comparison, spark and swap tests, and who tested.
 *
 * Figures (invented coil, cold spec 0.36–0.55 Ω below 50 °C, measured at 20 °C; leads
 * 0.10 Ω subtracted, common practice for low resistance):
 *  cyl 1: 0.57 → 0.47 Ω OK; cyl 2: 0.56 → 0.46 Ω OK, but the phone forgot the leads and said
 *  0.56 Ω over spec; cyl 3: 0.96 → 0.86 Ω over spec; cyl 4: 0.60 → 0.50 Ω OK. Each ± is the
 *  reading's limit of error plus the lead reading's (about 0.043 Ω here), which keeps every
 *  OK clear of 0.55 Ω. Cylinder 3 is
 *  more than 10 % from the median of the others (the odd-one-out rule of DESIGN §4).
 */
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { jobs } from '../../src/lib/server/services/jobs';
import { deskWorkshop, meter } from '../helpers/desk';
import { create, push } from '../helpers/sync';

const base = inject('baseURL');
let w: Awaited<ReturnType<typeof deskWorkshop>>;
let other: Awaited<ReturnType<typeof deskWorkshop>>;
let jobId: string;
let jobNumber: number;
let testId: string;
const readings: Record<string, string> = {};

beforeAll(async () => {
	w = await deskWorkshop(base, 'Display');
	other = await deskWorkshop(base, 'Display elsewhere');
	const job = await jobs.create(w.users.lead.actor, {
		complaint: 'Misfire on cylinder 3',
		assigneeId: w.users.technician.id
	});
	jobId = job.id as string;
	jobNumber = job.number as number;
	const t = create('test', {
		jobId,
		componentId: w.componentId,
		sheetId: w.sheetId,
		partNumber: w.partNumber,
		position: '1,2,3,4',
		meter: meter('Bench meter 2', 0.1),
		temperature: { mode: 'measured', tempC: 20 }
	});
	testId = t.entityId;
	const r = (position: string, raw: number, deviceResult?: object) => {
		const o = create('reading', {
			testId,
			checkKey: 'primary',
			position,
			samples: [
				{ value: raw + 0.01, unit: 'Ω' },
				{ value: raw, unit: 'Ω' }
			],
			rangeLabel: '200 Ω',
			...(deviceResult ? { deviceResult } : {})
		});
		readings[position] = o.entityId;
		return o;
	};
	const ops = [
		t,
		r('1', 0.57, { value: 0.47, verdict: 'within' }),
		r('2', 0.56, { value: 0.56, verdict: 'high' }),
		r('3', 0.96, { value: 0.86, verdict: 'high' }),
		r('4', 0.6, { value: 0.5, verdict: 'within' }),
		create('spark_test', { jobId, testId, position: '3', gapMm: 7, outcome: 'weak' }),
		create('swap_test', {
			jobId,
			testId,
			fromPosition: '3',
			toPosition: '1',
			beforeCounts: { '3': 6 },
			afterCounts: { '1': 5 },
			conclusion: 'fault_followed'
		})
	];
	expect((await push(w.as.technician, 'tech-phone', ops)).map((x) => x.status)).toEqual(
		Array(ops.length).fill('applied')
	);
});

describe('tests on the job', () => {
	it('give the JSON API every reading with the phone’s and the workshop’s results side by side', async () => {
		const r = await w.as.technician.get(`/api/jobs/${jobId}/tests`);
		expect(r.status).toBe(200);
		const { tests, sparks, swaps } = await r.json();
		expect(tests).toHaveLength(1);
		const t = tests[0];
		expect(t).toMatchObject({
			partNumber: w.partNumber,
			sheetVersion: 1,
			stateText: 'In progress',
			positions: ['1', '2', '3', '4'],
			temperature: 'Measured 20 °C',
			specsChosen: ['Cold spec · below 50 °C'],
			mismatches: 1
		});
		expect(t.technician).toContain('(Technician)');
		expect(t.meter).toEqual({
			name: 'Bench meter 2',
			leads: 'Lead zero 0.1 Ω, taken off each reading',
			ranges: ['200 Ω', '20 kΩ']
		});
		const [check] = t.checks;
		expect(check.specs).toEqual(['Cold spec · below 50 °C: 0.36 Ω to 0.55 Ω']);
		const byPos = Object.fromEntries(
			check.readings.map((x: { position: string }) => [x.position, x])
		);
		expect(byPos['1']).toMatchObject({
			samples: ['0.58 Ω', '0.57 Ω'],
			differ: false,
			phone: { key: 'within' },
			workshop: { key: 'within', text: '0.47 Ω' },
			rangeUnresolved: false
		});
		expect(byPos['2']).toMatchObject({
			differ: true,
			phone: { key: 'high', text: '0.56 Ω' },
			workshop: { key: 'within', text: '0.46 Ω' }
		});
		expect(byPos['3'].workshop).toMatchObject({ key: 'high', text: '0.86 Ω' });
		expect(check.comparison).toEqual({ kind: 'odd', odd: ['3'] });
		expect(sparks).toEqual([
			expect.objectContaining({ position: '3', gap: '7 mm', outcomeText: 'Weak spark' })
		]);
		expect(swaps[0].conclusion).toContain('followed the coil');
	});

	it('let a lead open any test of the workshop, and nobody else’s', async () => {
		const one = await w.as.lead.get(`/api/tests/${testId}`);
		expect(one.status).toBe(200);
		expect((await one.json()).test.id).toBe(testId);
		expect((await w.as.owner.get(`/api/jobs/${jobId}/tests`)).status).toBe(200);
		expect((await w.as.apprentice.get(`/api/tests/${testId}`)).status).toBe(404); // not their job
		expect((await w.as.apprentice.get(`/api/jobs/${jobId}/tests`)).status).toBe(404);
		expect((await other.as.lead.get(`/api/tests/${testId}`)).status).toBe(404);
		expect((await other.as.lead.get(`/api/jobs/${jobId}/tests`)).status).toBe(404);
	});

	it('show on the office job page in words, with the difference flagged', async () => {
		const r = await w.as.lead.get(`/jobs/${jobId}`, 'text/html');
		expect(r.status).toBe(200);
		const html = await r.text();
		expect(html).toContain(`Job ${jobNumber}`);
		expect(html).toContain(`id="test-${testId}"`);
		expect(html).toContain('spec sheet version 1');
		expect(html).toContain('Judged against: Cold spec · below 50 °C');
		expect(html).toContain('Workshop’s check');
		expect(html).toContain('They differ: the workshop’s result is kept.');
		expect(html).toContain('data-odd="yes"');
		expect(html).toContain('Weak spark');
		expect(html).toContain('Over spec');
		expect(html).not.toMatch(/>\s*(within|borderline|checkKey|serverResult)\s*</);
	});
});
