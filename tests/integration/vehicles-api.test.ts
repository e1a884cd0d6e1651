/**
 * The vehicles JSON API against the built app and MariaDB, with the VIN checks.
 *
 * VIN reference: 1M8GDM9AXKP042788, whose check digit (position 9) is X, is the worked
 * example of the check-digit calculation in the Wikipedia article "Vehicle identification
 * number" (section "Check-digit calculation"); the rule itself is 49 CFR Part 565.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { AuditEntry, Job, Vehicle } from '../../src/lib/server/db/models';
import * as customers from '../../src/lib/server/services/customers';
import { jobs } from '../../src/lib/server/services/jobs';
import { vehicles } from '../../src/lib/server/services/vehicles';
import type { Client } from '../helpers/http';
import {
	expectError,
	expectInvalid,
	expectStaleRefused,
	postCreated,
	tag,
	twoWorkshops,
	type Role,
	type Workshop
} from '../helpers/records';

/** Wikipedia, "Vehicle identification number", check-digit worked example: check digit X. */
const WORKED_VIN = '1M8GDM9AXKP042788';
/** The same VIN with position 9 changed to 1: the check digit no longer matches. */
const WRONG_CHECK_DIGIT = '1M8GDM9A1KP042788';

let a: Workshop;
let b: Workshop;
let as: Record<Role, Client>;
let vehicleOfB: string;

beforeAll(async () => {
	({ a, b, as } = await twoWorkshops('Vehicles'));
	vehicleOfB = (
		await vehicles.create(b.users.lead.actor, {
			make: 'Tessaly',
			model: 'Ondrava',
			vin: WORKED_VIN
		})
	).id as string;
});

const car = (extra: Record<string, unknown> = {}) => ({
	make: 'Corvane',
	model: 'Brisel',
	year: 2019,
	plate: 'TB24 KQL',
	odometer: 84210,
	odometerUnit: 'km',
	...extra
});

async function add(c: Client, body: Record<string, unknown>) {
	const out = await postCreated(c, '/api/vehicles', body);
	return out as { vehicle: Record<string, unknown> & { id: string }; warnings: { vin?: string } };
}

describe('VIN checks (validateVin: errors refuse, a check-digit mismatch is a warning)', () => {
	it('accepts the worked example with its check digit X and no warning', async () => {
		const { vehicle, warnings } = await add(as.technician, car({ vin: WORKED_VIN }));
		expect(vehicle.vin).toBe(WORKED_VIN);
		expect(warnings).toEqual({});
	});

	it('accepts a VIN whose check digit does not match, and says so', async () => {
		const { vehicle, warnings } = await add(as.technician, car({ vin: WRONG_CHECK_DIGIT }));
		expect(vehicle.vin).toBe(WRONG_CHECK_DIGIT);
		expect(warnings.vin).toMatch(/check digit \(position 9\) is 1 but the other characters give X/);
		const read = await (await as.technician.get(`/api/vehicles/${vehicle.id}`)).json();
		expect(read.warnings.vin).toBe(warnings.vin);
	});

	it('refuses the letters I, O and Q and a wrong length, naming the VIN field', async () => {
		const withO = `${WORKED_VIN.slice(0, 11)}O${WORKED_VIN.slice(12)}`;
		const e1 = await expectInvalid(
			await as.technician.json('POST', '/api/vehicles', car({ vin: withO })),
			'vin'
		);
		expect(e1.fields!.vin).toMatch(/Position 12: the letter O/);
		const e2 = await expectInvalid(
			await as.technician.json('POST', '/api/vehicles', car({ vin: WORKED_VIN.slice(0, 16) })),
			'vin'
		);
		expect(e2.fields!.vin).toMatch(/17 characters; this one has 16/);
	});

	it('stores a VIN typed in lower case with spaces and hyphens in its plain form', async () => {
		const { vehicle } = await add(as.technician, car({ vin: '1m8 gdm9a-xkp 042788' }));
		expect(vehicle.vin).toBe(WORKED_VIN);
	});

	it('takes a short chassis number only with a reason', async () => {
		await expectInvalid(
			await as.technician.json('POST', '/api/vehicles', car({ chassisNo: 'SB-1107' })),
			'chassisReason'
		);
		await expectInvalid(await as.technician.json('POST', '/api/vehicles', car()), 'vin');
		const { vehicle } = await add(
			as.technician,
			car({ chassisNo: 'SB-1107', chassisReason: 'Imported, built before 1981' })
		);
		expect(vehicle).toMatchObject({ vin: null, chassisNo: 'SB-1107' });
	});
});

describe('POST /api/vehicles', () => {
	it('adds a vehicle with its hybrid flag and odometer unit, audited per field', async () => {
		const { vehicle } = await add(
			as.lead,
			car({ vin: WORKED_VIN, hybrid: true, odometerUnit: 'mi' })
		);
		expect(vehicle).toMatchObject({
			hybrid: true,
			odometerUnit: 'mi',
			odometer: 84210,
			version: 1
		});
		const fields = (await AuditEntry.findAll({ where: { entityId: vehicle.id } })).map(
			(r) => r.field
		);
		expect(fields).toEqual(
			expect.arrayContaining(['vin', 'hybrid', 'odometer', 'odometerUnit', 'make'])
		);
	});

	it('answers 400 for a malformed body and naming an invalid year', async () => {
		await expectError(await as.lead.json('POST', '/api/vehicles', 'vin=1'), 400, 'invalid');
		const e = await expectInvalid(
			await as.lead.json('POST', '/api/vehicles', car({ vin: WORKED_VIN, year: 1850 })),
			'year'
		);
		expect(e.fields!.year).toMatch(/1900/);
	});

	it('refuses an apprentice adding a vehicle outside their own jobs (403)', async () => {
		await expectError(
			await as.apprentice.json('POST', '/api/vehicles', car({ vin: WORKED_VIN })),
			403,
			'forbidden'
		);
	});

	it('puts a vehicle added for a job on that job, owned by the job’s customer', async () => {
		const owner = await customers.create(a.users.lead.actor, { name: 'Job’s customer' });
		const job = await jobs.create(a.users.lead.actor, {
			complaint: 'Needs a vehicle',
			customerId: owner.id,
			assigneeId: a.users.apprentice.id
		});
		const { vehicle } = await add(as.apprentice, car({ vin: WORKED_VIN, jobId: job.id }));
		expect(vehicle.customerId).toBe(owner.id);
		expect((await Job.findByPk(job.id as string))!.vehicleId).toBe(vehicle.id);
	});

	it('answers 400 naming an owner of another workshop', async () => {
		const theirs = await customers.create(b.users.lead.actor, { name: 'B owner' });
		await expectInvalid(
			await as.lead.json('POST', '/api/vehicles', car({ vin: WORKED_VIN, customerId: theirs.id })),
			'customerId'
		);
	});
});

describe('GET /api/vehicles', () => {
	let t: string;
	let owner: string;
	beforeAll(async () => {
		t = tag('veh').toUpperCase().slice(-8);
		owner = (await customers.create(a.users.lead.actor, { name: `Owner ${t}` })).id as string;
		const lead = a.users.lead.actor;
		await vehicles.create(
			lead,
			car({ vin: WORKED_VIN, plate: `${t} A`, year: 2011, customerId: owner })
		);
		await vehicles.create(
			lead,
			car({ vin: WORKED_VIN, plate: `${t} B`, year: 2020, hybrid: true })
		);
		await vehicles.create(
			lead,
			car({ vin: WORKED_VIN, plate: `${t} C`, year: 2015, customerId: owner })
		);
	});
	const plates = async (qs: string) => {
		const r = await as.technician.get(`/api/vehicles?${qs}`);
		expect(r.status).toBe(200);
		const body = await r.json();
		return { ...body, plates: body.items.map((v: { plate: string }) => v.plate.slice(-1)) };
	};

	it('searches by plate whatever the spaces, and by the owner’s name', async () => {
		expect((await plates(`q=${t}B&sort=plate`)).plates).toEqual(['B']);
		expect((await plates(`q=Owner ${t}&sort=plate`)).plates).toEqual(['A', 'C']);
	});

	it('filters by hybrid/EV and owner, sorts and pages on the server', async () => {
		expect((await plates(`q=${t}&hybrid=yes`)).plates).toEqual(['B']);
		expect((await plates(`q=${t}&customer=${owner}&sort=-plate`)).plates).toEqual(['C', 'A']);
		expect((await plates(`q=${t}&sort=year`)).plates).toEqual(['A', 'C', 'B']);
		const p = await plates(`q=${t}&sort=-year&pageSize=1&page=2`);
		expect(p).toMatchObject({ total: 3, page: 2, pageSize: 1, plates: ['C'] });
	});

	it('answers 400 naming a parameter it cannot read', async () => {
		await expectInvalid(await as.lead.get('/api/vehicles?hybrid=perhaps'), 'hybrid');
		await expectInvalid(await as.lead.get('/api/vehicles?customer=nobody'), 'customer');
	});

	it('never lists another workshop’s vehicles', async () => {
		const body = await (await as.lead.get('/api/vehicles?q=Ondrava&pageSize=100')).json();
		expect(body.items.map((v: { id: string }) => v.id)).not.toContain(vehicleOfB);
	});
});

describe('GET /api/vehicles/:id', () => {
	it('answers the vehicle with its owner', async () => {
		const owner = await customers.create(a.users.lead.actor, { name: 'Named owner' });
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN, customerId: owner.id }));
		const body = await (await as.apprentice.get(`/api/vehicles/${vehicle.id}`)).json();
		expect(body.vehicle).toMatchObject({ id: vehicle.id, customer: { name: 'Named owner' } });
	});

	it('answers 404 for another workshop’s vehicle', async () => {
		await expectError(await as.lead.get(`/api/vehicles/${vehicleOfB}`), 404, 'not_found');
	});
});

describe('PATCH /api/vehicles/:id', () => {
	it('changes only the fields sent (the hybrid flag is kept) and warns about a new VIN', async () => {
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN, hybrid: true }));
		const r = await as.technician.json('PATCH', `/api/vehicles/${vehicle.id}`, {
			baseVersion: 1,
			vin: WRONG_CHECK_DIGIT,
			odometer: 90000
		});
		const body = await r.json();
		expect(r.status).toBe(200);
		expect(body.vehicle).toMatchObject({
			version: 2,
			hybrid: true,
			vin: WRONG_CHECK_DIGIT,
			odometer: 90000
		});
		expect(body.warnings.vin).toMatch(/check digit/);
	});

	it('refuses removing the VIN of a vehicle without a chassis number (400 naming vin)', async () => {
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN }));
		await expectInvalid(
			await as.lead.json('PATCH', `/api/vehicles/${vehicle.id}`, { baseVersion: 1, vin: '' }),
			'vin'
		);
		expect((await Vehicle.findByPk(vehicle.id))!.vin).toBe(WORKED_VIN);
	});

	it('answers 400 for a malformed body and naming an invalid field', async () => {
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN }));
		await expectError(
			await as.lead.json('PATCH', `/api/vehicles/${vehicle.id}`, '{"vin"'),
			400,
			'invalid'
		);
		await expectInvalid(
			await as.lead.json('PATCH', `/api/vehicles/${vehicle.id}`, { baseVersion: 1, odometer: -5 }),
			'odometer'
		);
	});

	it('lets an apprentice change only the vehicles of their own jobs (403 otherwise)', async () => {
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN }));
		await expectError(
			await as.apprentice.json('PATCH', `/api/vehicles/${vehicle.id}`, {
				baseVersion: 1,
				plate: 'X'
			}),
			403,
			'forbidden'
		);
	});

	it('answers 404 for another workshop’s vehicle', async () => {
		await expectError(
			await as.lead.json('PATCH', `/api/vehicles/${vehicleOfB}`, { baseVersion: 1, plate: 'X' }),
			404,
			'not_found'
		);
	});

	it('answers 409 with the current record when the version is stale', async () => {
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN }));
		await expectStaleRefused(
			as,
			'vehicles',
			vehicle.id,
			{ plate: 'TB25 AAA' },
			{ plate: 'TB25 BBB' }
		);
	});
});

describe('vehicle history', () => {
	it('lists the jobs of a vehicle newest first, closed ones included', async () => {
		const { vehicle } = await add(as.lead, car({ vin: WORKED_VIN }));
		const made: string[] = [];
		for (const complaint of ['First visit', 'Second visit', 'Third visit']) {
			const j = await jobs.create(a.users.lead.actor, { complaint, vehicleId: vehicle.id });
			made.push(j.id as string);
		}
		await jobs.update(a.users.lead.actor, made[0], 1, { status: 'closed' });
		const body = await (
			await as.lead.get(`/api/jobs?vehicle=${vehicle.id}&status=all&sort=-created`)
		).json();
		expect(body.items.map((j: { id: string }) => j.id)).toEqual([...made].reverse());
	});
});
