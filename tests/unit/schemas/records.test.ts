/**
 * The job and vehicle schemas shared by forms, the API and sync.
 * VIN reference: 1M8GDM9AXKP042788 (check digit X) is the worked example of the Wikipedia
 * article "Vehicle identification number", section "Check-digit calculation".
 */
import { describe, expect, it } from 'vitest';
import { jobListQuery, jobPatch, readJobForm } from '../../../src/lib/schemas/job';
import { customerPatch } from '../../../src/lib/schemas/customer';
import {
	findIdentityProblems,
	readVehicleForm,
	vehicleCreate,
	vehiclePatch,
	vinWarnings
} from '../../../src/lib/schemas/vehicle';

const WORKED_VIN = '1M8GDM9AXKP042788';

describe('patch schemas', () => {
	it.each([
		['job', jobPatch, { notes: 'x' }],
		['vehicle', vehiclePatch, { plate: 'TB1' }],
		['customer', customerPatch, { name: 'A' }]
	] as const)(
		'fill in no defaults for a %s patch (only the fields sent come out)',
		(_, schema, input) => {
			expect(Object.keys(schema.parse(input))).toEqual(Object.keys(input));
		}
	);
});

describe('vehicle fields', () => {
	it('normalise a VIN typed with spaces, hyphens and lower case', () => {
		const v = vehicleCreate.parse({ make: 'A', model: 'B', vin: ' 1m8gdm9a-xkp 042788 ' });
		expect(v.vin).toBe(WORKED_VIN);
	});

	it.each([
		['1M8GDM9AXKP04278', /has 16/],
		['1M8GDM9AXKP0427O8', /letter O/],
		['1M8GDM9AXKP04278Q', /letter Q/]
	])('refuse the VIN %s naming the problem', (vin, message) => {
		const r = vehicleCreate.safeParse({ make: 'A', model: 'B', vin });
		expect(r.success).toBe(false);
		expect(r.error!.issues[0].path).toEqual(['vin']);
		expect(r.error!.issues[0].message).toMatch(message);
	});

	it('accept a check digit that does not match, with a warning beside it', () => {
		const wrong = '1M8GDM9A2KP042788';
		expect(vehicleCreate.safeParse({ make: 'A', model: 'B', vin: wrong }).success).toBe(true);
		expect(vinWarnings(wrong)[0]).toMatch(/is 2 but the other characters give X/);
		expect(vinWarnings(WORKED_VIN)).toEqual([]);
	});

	it.each([
		[{}, 'vin'],
		[{ chassisNo: 'C-1' }, 'chassisReason'],
		[{ chassisNo: 'C-1', chassisReason: 'Built before 1981' }, null],
		[{ vin: WORKED_VIN }, null]
	])('need a VIN or a chassis number with a reason: %j → %s', (identity, field) => {
		const problems = findIdentityProblems(identity);
		expect(Object.keys(problems)).toEqual(field ? [field] : []);
	});

	it('read numbers typed with spaces, keep other text for the schema to refuse', () => {
		const fd = new FormData();
		fd.set('odometer', '84 210');
		fd.set('year', 'twenty');
		fd.set('hybrid', 'on');
		const v = readVehicleForm(fd);
		expect(v).toMatchObject({ odometer: 84210, year: 'twenty', hybrid: true, customerId: null });
		const r = vehicleCreate.safeParse({ ...v, make: 'A', model: 'B', vin: WORKED_VIN });
		expect(r.error!.issues.map((i) => [i.path[0], i.message])).toEqual([
			['year', 'A year like 2019']
		]);
	});
});

describe('job list query', () => {
	it('defaults to open jobs, newest first, 50 a page', () => {
		expect(jobListQuery.parse({})).toMatchObject({
			status: 'active',
			assignee: 'any',
			sort: '-number',
			page: 1,
			pageSize: 50
		});
	});

	it.each([
		[{ status: 'done' }, 'status'],
		[{ sort: '-colour' }, 'sort'],
		[{ pageSize: '101' }, 'pageSize'],
		[{ page: '0' }, 'page'],
		[{ to: '2026-13-01' }, 'to']
	])('refuse %j naming %s', (query, field) => {
		const r = jobListQuery.safeParse(query);
		expect(r.success).toBe(false);
		expect(r.error!.issues[0].path).toEqual([field]);
	});

	it('send only the selects a job form shows', () => {
		const fd = new FormData();
		fd.set('complaint', 'Misfire');
		fd.set('vehicleId', '');
		expect(readJobForm(fd)).toEqual({
			complaint: 'Misfire',
			location: '',
			notes: '',
			vehicleId: null
		});
	});
});
