/**
 * The rulebook's proof (DESIGN §6): every role — owner, lead, technician, apprentice, a lead
 * of another workshop, someone signed out — tries every write of every record through every
 * channel that offers it (the office's form actions, the JSON API, a phone's sync push), and
 * the answer must be the one this table expects, the write must have landed exactly when it
 * was allowed, and the channels must agree. Reads too: who sees a job on its page, through
 * the API and in a phone's pull, and whose clashes a lead lists and settles.
 *
 * The expectations are written here by hand from the roles table of the product brief
 * (DESIGN §6), not derived from the rules' code. Each case makes its own records through the
 * services (a few writes), so no case sees another's leftovers; sign-ins are made once.
 * Component and sheet figures are invented; the coil's primary winding limits are common
 * practice (no published source), as in the sync tests.
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import type { Actor } from '../../src/lib/server/auth/types';
import { db } from '../../src/lib/server/db';
import { components, sheets } from '../../src/lib/server/services/components';
import * as customers from '../../src/lib/server/services/customers';
import { jobs } from '../../src/lib/server/services/jobs';
import { savePricing } from '../../src/lib/server/quotes/pricing';
import { recordManualPayment } from '../../src/lib/server/payments/service';
import { answerQuote, quotes } from '../../src/lib/server/services/quotes';
import { tests } from '../../src/lib/server/services/tests';
import { vehicles } from '../../src/lib/server/services/vehicles';
import { uploadPhoto } from '../../src/lib/server/photos/service';
import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { makeWorkshop } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { signedIn, type Workshop } from '../helpers/records';
import { create, op, pullAll, type TestOp } from '../helpers/sync';

type RoleKey = 'owner' | 'lead' | 'technician' | 'apprentice' | 'otherLead' | 'signedOut';
const ROLES: RoleKey[] = ['owner', 'lead', 'technician', 'apprentice', 'otherLead', 'signedOut'];
type Channel = 'form' | 'api' | 'sync';
type Outcome = 'allow' | 'refuse';
type T = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** A write the table tries: its own records, each channel's request, and whether it landed. */
type Action = {
	name: string;
	/** Roles that may do it: every other role is refused. */
	allowed: RoleKey[];
	setup: (r: RoleKey) => Promise<T>;
	form?: (t: T, r: RoleKey) => { path: string; fields: Record<string, string> };
	api?: (t: T, r: RoleKey) => { method: string; path: string; body?: unknown };
	sync?: (t: T, r: RoleKey) => TestOp;
	/** Whether the write took effect (a read: whether the record was shown). */
	landed?: (t: T, r: RoleKey) => Promise<boolean>;
	/** A read: what each channel shows decides the outcome. */
	read?: Partial<Record<Channel, (t: T, r: RoleKey) => Promise<boolean>>>;
};

const LEADS: RoleKey[] = ['owner', 'lead'];
/** A different time zone for each role's attempt, so a change that landed is told apart. */
const ZONE_BY_ROLE: Record<RoleKey, string> = {
	owner: 'Europe/Berlin',
	lead: 'Europe/Paris',
	technician: 'Europe/Madrid',
	apprentice: 'Europe/Rome',
	otherLead: 'Europe/Vienna',
	signedOut: 'Europe/Oslo'
};
const STAFF: RoleKey[] = ['owner', 'lead', 'technician'];
const EVERYONE: RoleKey[] = ['owner', 'lead', 'technician', 'apprentice'];

let a: Workshop;
let b: Workshop;
const client = {} as Record<RoleKey, Client>;
let leadA: Actor;
let componentId: string;
let sheetId: string;
let hybridVan: string;
let plainCar: string;

/** The primary winding of a coil: 0.36–0.55 Ω cold (common practice, no published source). */
const CHECKS = [
	{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false,
		bands: [{ fromC: null, toC: 50, min: 0.36, max: 0.55 }] }
];
const METER = { ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }], leadResistance: 0.1, relativeMode: false };

const tagOf = () => `rb-${uuidv7().slice(-10)}`;
const idOf = (r: RoleKey) => (r === 'otherLead' ? b.users.lead.id : r === 'signedOut' ? null : a.users[r].id);
const actorOf = (r: RoleKey): Actor | null =>
	r === 'otherLead' ? b.users.lead.actor : r === 'signedOut' ? null : a.users[r].actor;
/** The workshop the acting user belongs to (A for someone signed out). */
const wsOf = (r: RoleKey) => (r === 'otherLead' ? b : a);
/** The acting user of workshop A (the lead for someone who is not one of A's). */
const self = (r: RoleKey): Actor => (r === 'otherLead' || r === 'signedOut' ? a.users.lead.actor : a.users[r].actor);
/** Whose work a role does: an apprentice's own, else the technician's (leads see it all). */
const ownWorker = (r: RoleKey) => (r === 'apprentice' ? a.users.apprentice : a.users.technician);
/** Someone else's work: the technician's for an apprentice, else the apprentice's. */
const otherWorker = (r: RoleKey) => (r === 'apprentice' ? a.users.technician : a.users.apprentice);

async function count(sql: string, ...replacements: unknown[]) {
	const [row] = await db().query<{ n: number | bigint }>(sql, { replacements, type: QueryTypes.SELECT });
	return Number(row.n);
}
async function rowOf(table: string, id: string) {
	const [row] = await db().query<Record<string, any>>(`SELECT * FROM ${table} WHERE id = ?`, { replacements: [id], type: QueryTypes.SELECT }); // eslint-disable-line @typescript-eslint/no-explicit-any
	return row;
}
const changedFrom = async (table: string, id: string, version: number) => (await rowOf(table, id)).version !== version;

/** A job of workshop A assigned to `assignee` (by the lead), on a plain car or the hybrid van. */
async function job(assignee: string | null, o: { status?: string; hybrid?: boolean; customerId?: string } = {}) {
	return (await jobs.create(leadA, {
		complaint: `Misfire ${tagOf()}`,
		assigneeId: assignee,
		vehicleId: o.hybrid ? hybridVan : plainCar,
		customerId: o.customerId ?? null,
		...(o.status ? { status: o.status } : {})
	})) as T;
}
/** A test started by `by` on `jobId` (in progress unless `o.state` says otherwise). */
const testOn = async (by: Actor, jobId: string, o: { state?: string; retestOf?: string } = {}) =>
	(await tests.create(by, { jobId, componentId, sheetId, meter: METER, temperature: { mode: 'measured', tempC: 20 }, ...o })) as T;
/** A finished test of the apprentice on a job of the apprentice's: it waits for a lead's sign-off. */
async function apprenticeTest(o: { status?: string } = {}) {
	const j = await job(a.users.apprentice.id, o);
	return { job: j, test: await testOn(a.users.apprentice.actor, j.id, { state: 'done' }), id: uuidv7() };
}
/**
 * A battery test saved by `who`'s phone on a job of theirs (12.24 V at 80 °F: 50 % charged,
 * Battery Council International's table, so "charge and re-test"): an apprentice's waits for
 * a lead's sign-off like a coil test.
 */
async function circuitTestBy(who: 'apprentice' | 'technician', o: { status?: string } = {}) {
	const j = await job(a.users[who].id, o);
	const c = create('circuit_test', {
		jobId: j.id,
		kind: 'battery',
		inputs: { batteryType: 'flooded', standard: 'sae_j537', ratedA: 600, tempC: (80 - 32) * (5 / 9), surfaceGone: true, restV: 12.24 }
	});
	const r = await client[who].json('POST', '/api/sync/push', { deviceId: `rb-circuit-${who}`, ops: [c] });
	expect((await r.json()).results[0].status).toBe('applied');
	return { job: j, test: { id: c.entityId }, id: uuidv7() } as T;
}
/** A reading of the primary winding by the lead's phone: 0.60 Ω less 0.10 Ω leads = 0.50 Ω, OK at 20 °C. */
async function okReading(testId: string) {
	const r = await client.lead.json('POST', '/api/sync/push', {
		deviceId: 'rb-readings',
		ops: [create('reading', { testId, checkKey: 'primary', samples: [{ value: 0.6, unit: 'Ω' }], rangeLabel: '200 Ω' })]
	});
	expect((await r.json()).results[0].status).toBe('applied');
}
/** A clash on the job's notes, made by two of the lead's phones from one version. */
async function clashOn(j: T) {
	const ops = (notes: string) => [op('job', 'patch', j.id, { notes }, j.version)];
	await client.lead.json('POST', '/api/sync/push', { deviceId: 'rb-close-1', ops: ops('Plug 2 wet') });
	const r = await client.lead.json('POST', '/api/sync/push', { deviceId: 'rb-close-2', ops: ops('Plug 2 dry') });
	expect((await r.json()).results[0].status).toBe('conflict');
	return (await rowOf('jobs', j.id)) as T;
}
/** The status-move channels of a job prepared by `setup`, landing when the job has `to`. */
const statusMove = (to: string) => ({
	form: (t: T) => ({ path: `/jobs/${t.job.id}?/status`, fields: { baseVersion: String(t.job.version), status: to } }),
	api: (t: T) => ({ method: 'POST', path: `/api/jobs/${t.job.id}/status`, body: { baseVersion: t.job.version, status: to } }),
	sync: (t: T) => op('job', 'patch', t.job.id, { status: to }, t.job.version),
	landed: async (t: T) => (await rowOf('jobs', t.job.id)).status === to
});
/** The sign-off channels of `t.test`: the job page's form, the JSON API, a phone's push. */
const signOffOf = (fields: Record<string, string> = {}) => ({
	form: (t: T) => ({ path: `/jobs/${t.job.id}?/signoff`, fields: { testId: t.test.id, decision: 'signed', ...fields } }),
	api: (t: T) => ({ method: 'POST', path: `/api/tests/${t.test.id}/signoff`, body: { ...fields } }),
	sync: (t: T) => create('signoff', { testId: t.test.id, mode: 'witnessed', ...fields }, t.id),
	landed: async (t: T, r: RoleKey) =>
		(await count('SELECT COUNT(*) AS n FROM signoffs WHERE test_id = ? AND created_by = ? AND decision = ?', t.test.id, idOf(r), fields.decision ?? 'signed')) === 1
});
/** A small invented picture (grey, 64×48 JPEG), made once. */
let picture: Buffer | null = null;
/** A photo taken by `by` on a job of `worker`'s, through the upload (the fake photo store). */
async function photoOn(worker: { id: string }, by: Actor) {
	picture ??= await sharp({ create: { width: 64, height: 48, channels: 3, background: '#707070' } }).jpeg().toBuffer();
	const j = await job(worker.id);
	const sha256 = createHash('sha256').update(picture).digest('hex');
	const { photo } = await uploadPhoto(by, uuidv7(), { jobId: j.id, sha256 }, picture);
	return { job: j, photo, id: uuidv7() };
}
/** The channels of a photo mark on `t.photo`: the job page's form, the JSON API, a phone's push. */
const photoMarkOf = (mark: string) => ({
	form: (t: T) => ({ path: `/jobs/${t.job.id}?/photoMark`, fields: { photoId: t.photo.id, mark } }),
	api: (t: T) => ({ method: 'POST', path: `/api/photos/${t.photo.id}/marks`, body: { mark } }),
	sync: (t: T) => create('photo_mark', { photoId: t.photo.id, mark }, t.id),
	landed: async (t: T, r: RoleKey) =>
		(await count('SELECT COUNT(*) AS n FROM photo_marks WHERE photo_id = ? AND created_by = ? AND mark = ?', t.photo.id, idOf(r), mark)) === 1
});
/** A draft sheet of the component, started by `by`. */
const draft = async (by: Actor) => (await sheets.create(by, { componentId, checks: CHECKS })) as T;
async function approved() {
	const d = await draft(leadA);
	return (await sheets.update(leadA, d.id, d.version, {}, { serverFields: { state: 'approved', approvedBy: leadA.userId, approvedAt: new Date() } })) as T;
}
const customerOnJobOf = async (worker: { id: string }) => {
	const c = (await customers.create(leadA, { name: `Customer ${tagOf()}` })) as T;
	await job(worker.id, { customerId: c.id });
	return c;
};
const vehicleOnJobOf = async (worker: { id: string }) => {
	const v = (await vehicles.create(leadA, { make: 'Norvik', model: 'Tessa', chassisNo: 'NV-1', chassisReason: 'Imported before VINs' })) as T;
	await jobs.create(leadA, { complaint: `Rough ${tagOf()}`, assigneeId: worker.id, vehicleId: v.id });
	return v;
};
const vehicleForm = (plate: string) => ({ customerId: '', vin: '', chassisNo: 'NV-1', chassisReason: 'Imported before VINs', plate, make: 'Norvik', model: 'Tessa', year: '', engineCode: '', odometer: '', odometerUnit: 'km' });

const ACTIONS: Action[] = [
	// ——— Jobs ———
	{
		name: 'open a job for a customer of workshop A',
		allowed: EVERYONE,
		setup: async () => ({ tag: tagOf(), customerId: ((await customers.create(leadA, { name: 'Job customer' })) as T).id }),
		form: (t) => ({ path: '/jobs/new', fields: { complaint: t.tag, customerId: t.customerId, location: '', notes: '' } }),
		api: (t) => ({ method: 'POST', path: '/api/jobs', body: { complaint: t.tag, customerId: t.customerId } }),
		sync: (t) => create('job', { complaint: t.tag, customerId: t.customerId }),
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM jobs WHERE complaint = ?', t.tag)) === 1
	},
	{
		name: 'open a job naming its own number (the number is the server’s)',
		allowed: [...EVERYONE, 'otherLead'],
		setup: async () => ({ tag: tagOf() }),
		form: (t) => ({ path: '/jobs/new', fields: { complaint: t.tag, number: '7', location: '', notes: '' } }),
		api: (t) => ({ method: 'POST', path: '/api/jobs', body: { complaint: t.tag, number: 7 } }),
		sync: (t) => create('job', { complaint: t.tag, number: 7 }),
		landed: async (t, r) =>
			(await count('SELECT COUNT(*) AS n FROM jobs WHERE complaint = ? AND workshop_id = ? AND number > 1000', t.tag, wsOf(r).workshop.id)) === 1
	},
	{
		name: 'open a job assigned to someone else',
		allowed: [...LEADS, 'otherLead'],
		setup: async (r) => ({ tag: tagOf(), to: r === 'otherLead' ? b.users.apprentice.id : otherWorker(r).id }),
		form: (t) => ({ path: '/jobs/new', fields: { complaint: t.tag, assigneeId: t.to, location: '', notes: '' } }),
		api: (t) => ({ method: 'POST', path: '/api/jobs', body: { complaint: t.tag, assigneeId: t.to } }),
		sync: (t) => create('job', { complaint: t.tag, assigneeId: t.to }),
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM jobs WHERE complaint = ? AND assignee_id = ?', t.tag, t.to)) === 1
	},
	{
		name: 'open a job already closed',
		allowed: [...STAFF, 'otherLead'],
		setup: async () => ({ tag: tagOf() }),
		api: (t) => ({ method: 'POST', path: '/api/jobs', body: { complaint: t.tag, status: 'closed' } }),
		sync: (t) => create('job', { complaint: t.tag, status: 'closed' }),
		landed: async (t) => (await count("SELECT COUNT(*) AS n FROM jobs WHERE complaint = ? AND status = 'closed'", t.tag)) === 1
	},
	...(['technician', 'apprentice'] as const).map(
		(who): Action => ({
			name: `change the complaint of the ${who}’s job`,
			allowed: [...LEADS, who],
			setup: async () => job(a.users[who].id),
			form: (t) => ({ path: `/jobs/${t.id}?/update`, fields: { baseVersion: String(t.version), complaint: `${t.complaint} (changed)`, location: '', notes: '' } }),
			api: (t) => ({ method: 'PATCH', path: `/api/jobs/${t.id}`, body: { baseVersion: t.version, complaint: `${t.complaint} (changed)` } }),
			sync: (t) => op('job', 'patch', t.id, { complaint: `${t.complaint} (changed)` }, t.version),
			landed: async (t) => changedFrom('jobs', t.id, t.version)
		})
	),
	{
		name: 'reassign a job to someone else',
		allowed: LEADS,
		setup: async (r) => ({ ...(await job(ownWorker(r).id)), to: otherWorker(r).id }),
		form: (t) => ({ path: `/jobs/${t.id}?/update`, fields: { baseVersion: String(t.version), complaint: t.complaint, location: '', notes: '', assigneeId: t.to } }),
		api: (t) => ({ method: 'PATCH', path: `/api/jobs/${t.id}`, body: { baseVersion: t.version, assigneeId: t.to } }),
		sync: (t) => op('job', 'patch', t.id, { assigneeId: t.to }, t.version),
		landed: async (t) => (await rowOf('jobs', t.id)).assignee_id === t.to
	},
	...(
		[
			['move a job from open to testing', 'open', 'testing', EVERYONE],
			['close a job', 'repaired', 'closed', STAFF],
			['reopen a closed job', 'closed', 'testing', LEADS]
		] as const
	).map(
		([name, from, to, allowed]): Action => ({
			name,
			allowed: [...allowed],
			setup: async (r) => job(ownWorker(r).id, { status: from }),
			form: (t) => ({ path: `/jobs/${t.id}?/status`, fields: { baseVersion: String(t.version), status: to } }),
			api: (t) => ({ method: 'POST', path: `/api/jobs/${t.id}/status`, body: { baseVersion: t.version, status: to } }),
			sync: (t) => op('job', 'patch', t.id, { status: to }, t.version),
			landed: async (t) => (await rowOf('jobs', t.id)).status === to
		})
	),
	{
		name: 'remove a job',
		allowed: LEADS,
		setup: async (r) => job(ownWorker(r).id),
		sync: (t) => op('job', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('jobs', t.id)).deleted_at !== null
	},

	// ——— Customers and vehicles ———
	{
		name: 'add a customer on its own',
		allowed: [...STAFF, 'otherLead'],
		setup: async () => ({ tag: tagOf() }),
		form: (t) => ({ path: '/customers/new', fields: { name: t.tag, phone: '', email: '' } }),
		api: (t) => ({ method: 'POST', path: '/api/customers', body: { name: t.tag } }),
		sync: (t) => create('customer', { name: t.tag }),
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM customers WHERE name = ?', t.tag)) === 1
	},
	{
		name: 'add a customer for one’s own job',
		allowed: EVERYONE,
		setup: async (r) => ({ tag: tagOf(), job: await job(ownWorker(r).id) }),
		form: (t) => ({ path: '/customers/new', fields: { name: t.tag, phone: '', email: '', jobId: t.job.id } }),
		api: (t) => ({ method: 'POST', path: '/api/customers', body: { name: t.tag, jobId: t.job.id } }),
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM customers c JOIN jobs j ON j.customer_id = c.id WHERE c.name = ? AND j.id = ?', t.tag, t.job.id)) === 1
	},
	...(['technician', 'apprentice'] as const).map(
		(who): Action => ({
			name: `change a customer on the ${who}’s job`,
			allowed: who === 'apprentice' ? EVERYONE : STAFF,
			setup: async () => customerOnJobOf(a.users[who]),
			form: (t) => ({ path: `/customers/${t.id}?/update`, fields: { baseVersion: String(t.version), name: `${t.name} (changed)`, phone: '', email: '' } }),
			api: (t) => ({ method: 'PATCH', path: `/api/customers/${t.id}`, body: { baseVersion: t.version, name: `${t.name} (changed)` } }),
			sync: (t) => op('customer', 'patch', t.id, { name: `${t.name} (changed)` }, t.version),
			landed: async (t) => changedFrom('customers', t.id, t.version)
		})
	),
	{
		name: 'remove a customer',
		allowed: LEADS,
		setup: async (r) => customerOnJobOf(ownWorker(r)),
		sync: (t) => op('customer', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('customers', t.id)).deleted_at !== null
	},
	{
		name: 'add a vehicle on its own',
		allowed: [...STAFF, 'otherLead'],
		setup: async () => ({ tag: tagOf() }),
		form: (t) => ({ path: '/vehicles/new', fields: vehicleForm(t.tag) }),
		api: (t) => ({ method: 'POST', path: '/api/vehicles', body: { make: 'Norvik', model: 'Tessa', plate: t.tag, chassisNo: 'NV-1', chassisReason: 'Imported before VINs' } }),
		sync: (t) => create('vehicle', { make: 'Norvik', model: 'Tessa', plate: t.tag, chassisNo: 'NV-1', chassisReason: 'Imported before VINs' }),
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM vehicles WHERE plate = ?', t.tag)) === 1
	},
	...(['technician', 'apprentice'] as const).map(
		(who): Action => ({
			name: `change a vehicle on the ${who}’s job`,
			allowed: who === 'apprentice' ? EVERYONE : STAFF,
			setup: async () => ({ ...(await vehicleOnJobOf(a.users[who])), plate: tagOf().slice(-12) }),
			form: (t) => ({ path: `/vehicles/${t.id}?/update`, fields: { baseVersion: String(t.version), ...vehicleForm(t.plate) } }),
			api: (t) => ({ method: 'PATCH', path: `/api/vehicles/${t.id}`, body: { baseVersion: t.version, plate: t.plate } }),
			sync: (t) => op('vehicle', 'patch', t.id, { plate: t.plate }, t.version),
			landed: async (t) => changedFrom('vehicles', t.id, t.version)
		})
	),
	{
		name: 'remove a vehicle',
		allowed: LEADS,
		setup: async (r) => vehicleOnJobOf(ownWorker(r)),
		sync: (t) => op('vehicle', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('vehicles', t.id)).deleted_at !== null
	},

	// ——— Tests and what a phone appends to them ———
	...(
		[
			['start a coil test on one’s own job', false, 'own', EVERYONE],
			['start a coil test on a hybrid', true, 'own', STAFF],
			['start a coil test on someone else’s job', false, 'other', LEADS]
		] as const
	).map(
		([name, hybrid, whose, allowed]): Action => ({
			name,
			allowed: [...allowed],
			setup: async (r) => ({ job: await job((whose === 'own' ? ownWorker(r) : otherWorker(r)).id, { hybrid }), id: uuidv7() }),
			sync: (t) => create('test', { jobId: t.job.id, componentId, sheetId, meter: METER, temperature: { mode: 'overnight' } }, t.id),
			landed: async (t) => (await count('SELECT COUNT(*) AS n FROM tests WHERE id = ?', t.id)) === 1
		})
	),
	{
		name: 'start a coil test naming someone else as its technician (the technician is whoever starts it)',
		allowed: EVERYONE,
		setup: async (r) => ({ job: await job(ownWorker(r).id), id: uuidv7() }),
		sync: (t) => create('test', { jobId: t.job.id, componentId, sheetId, technicianId: a.users.owner.id, meter: METER, temperature: { mode: 'overnight' } }, t.id),
		landed: async (t, r) => (await rowOf('tests', t.id))?.technician_id === idOf(r)
	},
	...(
		[
			['change one’s own test', 'own', EVERYONE],
			['change a test someone else started', 'lead', LEADS]
		] as const
	).map(
		([name, by, allowed]): Action => ({
			name,
			allowed: [...allowed],
			setup: async (r) => {
				const j = await job(ownWorker(r).id);
				const other = r === 'lead' ? a.users.owner.actor : leadA;
				return testOn(by === 'own' ? self(r) : other, j.id);
			},
			sync: (t) => op('test', 'patch', t.id, { notes: 'Boot cracked' }, t.version),
			landed: async (t) => changedFrom('tests', t.id, t.version)
		})
	),
	{
		name: 'remove one’s own test',
		allowed: EVERYONE,
		setup: async (r) => testOn(self(r), (await job(ownWorker(r).id)).id),
		sync: (t) => op('test', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('tests', t.id)).deleted_at !== null
	},
	...(
		[
			['add a reading to a test of one’s own job', 'reading', false, 'own', EVERYONE],
			['add a reading on a hybrid', 'reading', true, 'own', STAFF],
			['add a reading to a test of someone else’s job', 'reading', false, 'other', LEADS],
			['add a spark test on one’s own job', 'spark_test', false, 'own', EVERYONE],
			['add a spark test on a hybrid', 'spark_test', true, 'own', STAFF],
			['add a swap test on one’s own job', 'swap_test', false, 'own', EVERYONE],
			['add a swap test on a hybrid', 'swap_test', true, 'own', STAFF],
			['add a battery test on one’s own job', 'circuit_test', false, 'own', EVERYONE],
			['add a battery test on someone else’s job', 'circuit_test', false, 'other', LEADS],
			['add a battery test on a hybrid', 'circuit_test', true, 'own', STAFF]
		] as const
	).map(
		([name, entity, hybrid, whose, allowed]): Action => ({
			name,
			allowed: [...allowed],
			setup: async (r) => {
				const j = await job((whose === 'own' ? ownWorker(r) : otherWorker(r)).id, { hybrid });
				return { job: j, test: await testOn(leadA, j.id), id: uuidv7() };
			},
			sync: (t) =>
				create(
					entity,
					entity === 'reading'
						? { testId: t.test.id, checkKey: 'primary', samples: [{ value: 0.42, unit: 'Ω' }] }
						: entity === 'spark_test'
							? { jobId: t.job.id, position: '1', gapMm: 10, outcome: 'go' }
							: entity === 'circuit_test'
								? { jobId: t.job.id, kind: 'battery', inputs: { batteryType: 'flooded', tempC: 20, restV: 12.6, surfaceGone: true } }
								: { jobId: t.job.id, fromPosition: '1', toPosition: '3', beforeCounts: { 1: 9 }, afterCounts: { 3: 8 }, conclusion: 'fault_followed' },
					t.id
				),
			landed: async (t, r) => {
				const table = { reading: 'readings', spark_test: 'spark_tests', swap_test: 'swap_tests', circuit_test: 'circuit_tests' }[entity];
				const row = await rowOf(table, t.id);
				return !!row && row.created_by === idOf(r);
			}
		})
	),

	// ——— Quotes (priced by the server; the workshop's prices are set in beforeAll) ———
	{
		name: 'make a quote on one’s own job',
		allowed: EVERYONE,
		setup: async (r) => ({ job: await job(ownWorker(r).id), id: uuidv7() }),
		sync: (t) => create('quote', { jobId: t.job.id, request: { diagnostic: true } }, t.id),
		landed: async (t) => !!(await rowOf('quotes', t.id))
	},
	{
		name: 'make a quote on someone else’s job',
		allowed: LEADS,
		setup: async (r) => ({ job: await job(otherWorker(r).id), id: uuidv7() }),
		sync: (t) => create('quote', { jobId: t.job.id, request: { diagnostic: true } }, t.id),
		landed: async (t) => !!(await rowOf('quotes', t.id))
	},
	{
		name: 'remove a quote of one’s own job the customer answered',
		allowed: LEADS,
		setup: async (r) => {
			const j = await job(ownWorker(r).id);
			const q = (await quotes.create(leadA, { jobId: j.id, request: { diagnostic: true } })) as T;
			await db().transaction((t) => answerQuote(leadA, q.id, 'approved', { name: 'Rulebook Customer', via: 'verbal', by: leadA.userId }, t));
			return (await quotes.read(leadA, q.id)) as T;
		},
		sync: (t) => op('quote', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('quotes', t.id)).deleted_at !== null
	},

	// ——— Refunds: leads and owners only (the diagnostic fee 40.00 + 20 % = 48.00, cash) ———
	{
		name: 'refund part of a payment on one’s own job',
		allowed: LEADS,
		setup: async (r) => {
			const j = await job(ownWorker(r).id);
			const p = await recordManualPayment(leadA, j.id, { purpose: 'diagnostic', method: 'cash' });
			return { job: j, paymentId: p.paymentId };
		},
		form: (t) => ({ path: `/jobs/${t.job.id}/money?/refund`, fields: { paymentId: t.paymentId, amount: '1.00', reason: '' } }),
		api: (t) => ({ method: 'POST', path: `/api/payments/${t.paymentId}/refund`, body: { amount: '1.00' } }),
		landed: async (t) => {
			const [row] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM payment_refunds WHERE payment_id = ?', {
				replacements: [t.paymentId],
				type: QueryTypes.SELECT
			});
			return Number(row.n) > 0;
		}
	},

	// ——— Photo marks (remove; for the customer): the person who took it, or a lead ———
	{
		name: 'remove a photo one took oneself',
		allowed: EVERYONE,
		setup: async (r) => photoOn(ownWorker(r), self(r)),
		...photoMarkOf('removed')
	},
	{
		name: 'remove a photo someone else took on one’s own job',
		allowed: LEADS,
		setup: async (r) => photoOn(ownWorker(r), leadA),
		...photoMarkOf('removed')
	},
	{
		name: 'choose a photo someone else took for the customer report',
		allowed: LEADS,
		setup: async (r) => photoOn(ownWorker(r), leadA),
		...photoMarkOf('for_customer')
	},

	// ——— Sign-offs of apprentice work ———
	{ name: 'sign off an apprentice’s finished test', allowed: LEADS, setup: () => apprenticeTest(), ...signOffOf() },
	{
		name: 'sign off a test naming someone else as the signer (the signer is whoever signs)',
		allowed: LEADS,
		setup: () => apprenticeTest(),
		api: (t) => ({ method: 'POST', path: `/api/tests/${t.test.id}/signoff`, body: { createdBy: a.users.owner.id, signedBy: a.users.owner.id } }),
		sync: (t) => create('signoff', { testId: t.test.id, mode: 'witnessed', signedBy: a.users.owner.id }, t.id),
		landed: async (t, r) => (await count('SELECT COUNT(*) AS n FROM signoffs WHERE test_id = ? AND created_by = ?', t.test.id, idOf(r))) === 1
	},
	{
		name: 'send an apprentice’s test back with a note',
		allowed: LEADS,
		setup: () => apprenticeTest(),
		...signOffOf({ decision: 'sent_back', note: 'Read the secondary winding on the 20 kΩ range' })
	},
	{
		name: 'sign off a technician’s test (only an apprentice’s test needs one)',
		allowed: [],
		setup: async () => {
			const j = await job(a.users.technician.id);
			return { job: j, test: await testOn(a.users.technician.actor, j.id, { state: 'done' }), id: uuidv7() };
		},
		...signOffOf()
	},
	{
		name: 'sign off an apprentice’s test already signed off',
		allowed: [],
		setup: async () => {
			const t = await apprenticeTest();
			const r = await client.owner.json('POST', `/api/tests/${t.test.id}/signoff`, {});
			expect(r.status).toBe(201);
			return t;
		},
		...signOffOf(),
		// The owner's sign-off of the set-up stays the only one.
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM signoffs WHERE test_id = ?', t.test.id)) > 1
	},

	// ——— Sign-offs of an apprentice's circuit tests (battery, charging, …): the same rules ———
	{ name: 'sign off an apprentice’s battery test', allowed: LEADS, setup: () => circuitTestBy('apprentice'), ...signOffOf() },
	{
		name: 'send an apprentice’s battery test back with a note',
		allowed: LEADS,
		setup: () => circuitTestBy('apprentice'),
		...signOffOf({ decision: 'sent_back', note: 'Rest the battery six hours, then read it again' })
	},
	{ name: 'sign off a technician’s battery test (only an apprentice’s needs one)', allowed: [], setup: () => circuitTestBy('technician'), ...signOffOf() },
	{
		name: 'close a job while an apprentice’s battery test waits for sign-off',
		allowed: [],
		setup: () => circuitTestBy('apprentice', { status: 'repaired' }),
		...statusMove('closed')
	},
	{
		name: 'close a job once its apprentice’s battery test is signed off',
		allowed: LEADS,
		setup: async () => {
			const t = await circuitTestBy('apprentice', { status: 'repaired' });
			expect((await client.lead.json('POST', `/api/tests/${t.test.id}/signoff`, {})).status).toBe(201);
			return t;
		},
		...statusMove('closed')
	},

	// ——— What the work must show before a job is re-tested OK or closed ———
	{
		name: 'mark a job re-tested OK with no re-test recorded',
		allowed: [],
		setup: async (r) => {
			const j = await job(ownWorker(r).id, { status: 'repaired' });
			await testOn(self(r), j.id, { state: 'done' });
			return { job: j };
		},
		...statusMove('retested_ok')
	},
	{
		name: 'mark a job re-tested OK once a finished re-test of the same part reads OK',
		allowed: EVERYONE,
		setup: async (r) => {
			const j = await job(ownWorker(r).id, { status: 'repaired' });
			const first = await testOn(self(r), j.id, { state: 'done' });
			const again = await testOn(self(r), j.id, { state: 'done', retestOf: first.id });
			await okReading(again.id);
			return { job: j };
		},
		...statusMove('retested_ok')
	},
	{
		name: 'close a job while an apprentice’s test waits for sign-off',
		allowed: [],
		setup: () => apprenticeTest({ status: 'repaired' }),
		...statusMove('closed')
	},
	{
		name: 'close a job once its apprentice’s tests are signed off',
		allowed: LEADS,
		setup: async () => {
			const t = await apprenticeTest({ status: 'repaired' });
			expect((await client.lead.json('POST', `/api/tests/${t.test.id}/signoff`, {})).status).toBe(201);
			return t;
		},
		...statusMove('closed')
	},
	{
		name: 'close a job with an open clash on it',
		allowed: [],
		setup: async (r) => ({ job: await clashOn(await job(ownWorker(r).id, { status: 'repaired' })) }),
		...statusMove('closed')
	},

	// ——— The spec library ———
	{
		name: 'add a component',
		allowed: [...EVERYONE, 'otherLead'],
		setup: async () => ({ pn: `RB-${uuidv7().slice(-8)}` }),
		api: (t) => ({ method: 'POST', path: '/api/components', body: { partNumber: t.pn, kind: 'ignition_coil' } }),
		sync: (t) => create('component', { partNumber: t.pn, kind: 'ignition_coil' }),
		landed: async (t) => (await count('SELECT COUNT(*) AS n FROM components WHERE part_number = ?', t.pn)) === 1
	},
	...(
		[
			['change a component’s description', { description: 'Pencil coil, changed' }, EVERYONE],
			['remove a caution from a component', { cautions: [] }, LEADS]
		] as const
	).map(
		([name, fields, allowed]): Action => ({
			name,
			allowed: [...allowed],
			setup: async () => (await components.create(leadA, { partNumber: `RB-${uuidv7().slice(-8)}`, kind: 'ignition_coil', cautions: ['hot_surface'] })) as T,
			api: (t) => ({ method: 'PATCH', path: `/api/components/${t.id}`, body: { baseVersion: t.version, ...fields } }),
			sync: (t) => op('component', 'patch', t.id, { ...fields }, t.version),
			landed: async (t) => changedFrom('components', t.id, t.version)
		})
	),
	{
		name: 'remove a component',
		allowed: LEADS,
		setup: async () => (await components.create(leadA, { partNumber: `RB-${uuidv7().slice(-8)}`, kind: 'ignition_coil' })) as T,
		sync: (t) => op('component', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('components', t.id)).deleted_at !== null
	},
	{
		name: 'start a draft sheet calling it approved (the state is the server’s)',
		allowed: EVERYONE,
		setup: async () => ({ id: uuidv7(), source: tagOf() }),
		api: (t) => ({ method: 'POST', path: '/api/sheets', body: { componentId, checks: CHECKS, source: { document: t.source }, state: 'approved', approvedBy: a.users.technician.id } }),
		sync: (t) => create('sheet', { componentId, checks: CHECKS, source: { document: t.source }, state: 'approved', approvedBy: a.users.technician.id }, t.id),
		landed: async (t) => (await count("SELECT COUNT(*) AS n FROM spec_sheets WHERE source LIKE ? AND state = 'draft' AND approved_by IS NULL", `%${t.source}%`)) === 1
	},
	{
		name: 'change a draft sheet',
		allowed: EVERYONE,
		setup: async () => draft(a.users.technician.actor),
		api: (t) => ({ method: 'PATCH', path: `/api/sheets/${t.id}`, body: { baseVersion: t.version, source: { document: 'Workshop notes', page: '2' } } }),
		sync: (t) => op('sheet', 'patch', t.id, { source: { document: 'Workshop notes', page: '2' } }, t.version),
		landed: async (t) => changedFrom('spec_sheets', t.id, t.version)
	},
	{
		name: 'change an approved sheet',
		allowed: [],
		setup: approved,
		api: (t) => ({ method: 'PATCH', path: `/api/sheets/${t.id}`, body: { baseVersion: t.version, source: { document: 'Changed after approval' } } }),
		sync: (t) => op('sheet', 'patch', t.id, { source: { document: 'Changed after approval' } }, t.version),
		landed: async (t) => changedFrom('spec_sheets', t.id, t.version)
	},
	{
		name: 'approve a draft sheet',
		allowed: LEADS,
		setup: async () => draft(a.users.technician.actor),
		api: (t) => ({ method: 'POST', path: `/api/sheets/${t.id}/approve`, body: { baseVersion: t.version } }),
		landed: async (t) => (await rowOf('spec_sheets', t.id)).state === 'approved'
	},
	{
		name: 'discard the technician’s draft sheet',
		allowed: STAFF,
		setup: async () => draft(a.users.technician.actor),
		api: (t) => ({ method: 'DELETE', path: `/api/sheets/${t.id}`, body: { baseVersion: t.version } }),
		sync: (t) => op('sheet', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('spec_sheets', t.id)).deleted_at !== null
	},
	{
		name: 'discard an approved sheet',
		allowed: [],
		setup: approved,
		api: (t) => ({ method: 'DELETE', path: `/api/sheets/${t.id}`, body: { baseVersion: t.version } }),
		sync: (t) => op('sheet', 'delete', t.id, {}, t.version),
		landed: async (t) => (await rowOf('spec_sheets', t.id)).deleted_at !== null
	},

	// ——— Clashes ———
	{
		name: 'settle a clash of workshop A',
		allowed: LEADS,
		setup: async () => {
			const j = await job(a.users.technician.id);
			const push = async (c: Client, device: string, notes: string) => {
				const r = await c.json('POST', '/api/sync/push', { deviceId: device, ops: [op('job', 'patch', j.id, { notes }, j.version)] });
				return (await r.json()).results[0];
			};
			await push(client.technician, 'rb-clash-1', 'Plug 3 oily');
			const clash = await push(client.lead, 'rb-clash-2', 'Plug 3 dry');
			expect(clash.status).toBe('conflict');
			return { id: clash.conflictId as string };
		},
		api: (t) => ({ method: 'POST', path: `/api/conflicts/${t.id}`, body: { pick: 'server' } }),
		landed: async (t) => (await count("SELECT COUNT(*) AS n FROM conflicts WHERE id = ? AND status = 'settled'", t.id)) === 1
	},

	// ——— Reads ———
	...(['technician', 'apprentice'] as const).map(
		(who): Action => ({
			name: `see the ${who}’s job`,
			allowed: [...LEADS, who],
			setup: async () => {
				const j = await job(a.users[who].id);
				return { job: j, test: await testOn(leadA, j.id) };
			},
			read: {
				form: async (t, r) => (await client[r].get(`/jobs/${t.job.id}`, 'text/html')).status === 200,
				api: async (t, r) => (await client[r].get(`/api/jobs/${t.job.id}`)).status === 200,
				sync: async (t, r) => {
					if (r === 'signedOut') return (await client[r].get('/api/sync/pull?cursor=0')).status === 200;
					const ids = new Set((await pullAll(client[r], 0, 1000)).changes.map((c) => c.entityId));
					const all = ids.has(t.job.id) && ids.has(t.test.id);
					expect(all || (!ids.has(t.job.id) && !ids.has(t.test.id)), 'a job and its tests travel together').toBe(true);
					return all;
				}
			}
		})
	),
	{
		name: 'list the clashes of workshop A',
		allowed: LEADS,
		setup: async () => {
			const j = await job(a.users.technician.id);
			const ops = (notes: string) => [op('job', 'patch', j.id, { notes }, j.version)];
			await client.technician.json('POST', '/api/sync/push', { deviceId: 'rb-list-1', ops: ops('Coil cracked') });
			const r = await client.lead.json('POST', '/api/sync/push', { deviceId: 'rb-list-2', ops: ops('Coil fine') });
			return { id: (await r.json()).results[0].conflictId };
		},
		read: {
			api: async (t, r) => {
				const res = await client[r].get('/api/conflicts');
				return res.status === 200 && (await res.json()).items.some((c: { conflictId: string }) => c.conflictId === t.id);
			}
		}
	},
	// ——— The workshop's settings (the team page's forms; no JSON route, no sync): leads and owners, each for their own workshop ———
	{
		name: 'change the workshop’s time zone',
		allowed: [...LEADS, 'otherLead'],
		setup: async (r) => ({ zone: ZONE_BY_ROLE[r] }),
		form: (t) => ({ path: '/team?/timeZone', fields: { timeZone: t.zone } }),
		landed: async (t, r) => (await count('SELECT COUNT(*) AS n FROM workshops WHERE id = ? AND time_zone = ?', wsOf(r).workshop.id, t.zone)) === 1
	},
	{
		name: 'change what the workshop’s phones keep',
		allowed: [...LEADS, 'otherLead'],
		setup: async (r) => ({ days: String(40 + ROLES.indexOf(r)) }),
		form: (t) => ({ path: '/team?/windows', fields: { phoneDays: t.days, deskDays: '30' } }),
		landed: async (t, r) => (await count('SELECT COUNT(*) AS n FROM sync_settings WHERE workshop_id = ? AND phone_days = ?', wsOf(r).workshop.id, Number(t.days))) === 1
	}
];

type Case = { action: string; role: RoleKey; channel: Channel; expected: Outcome; got: Outcome; landed: boolean | null; detail: string };
const CHANNELS = (x: Action): Channel[] =>
	x.read ? (Object.keys(x.read) as Channel[]) : (['form', 'api', 'sync'] as const).filter((c) => x[c]);
const TOTAL = ACTIONS.reduce((n, x) => n + ROLES.length * CHANNELS(x).length, 0);

/** Send one write through one channel; whether it was allowed, and what was answered. */
async function attempt(x: Action, channel: Channel, t: T, r: RoleKey): Promise<[Outcome, string]> {
	const c = client[r];
	if (channel === 'form') {
		// The form action as a page with JavaScript posts it (use:enhance): the same action,
		// answered as its result rather than the page drawn again, which keeps the table quick.
		const { path, fields } = x.form!(t, r);
		const res = await fetch(c.base + path, {
			method: 'POST',
			headers: c.headers({ 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json', 'x-sveltekit-action': 'true' }),
			body: new URLSearchParams(fields).toString(),
			redirect: 'manual'
		});
		const result = (await res.json()) as { type: string; status?: number; location?: string };
		const ok = result.type === 'success' || (result.type === 'redirect' && !result.location!.startsWith('/sign-in'));
		return [ok ? 'allow' : 'refuse', JSON.stringify(result).slice(0, 160)];
	}
	if (channel === 'api') {
		const { method, path, body } = x.api!(t, r);
		const res = await c.json(method, path, body ?? {});
		const text = await res.text();
		return [res.ok ? 'allow' : 'refuse', `${res.status} ${text.slice(0, 160)}`];
	}
	const res = await c.json('POST', '/api/sync/push', { deviceId: `rb-${r}`, ops: [x.sync!(t, r)] });
	if (res.status !== 200) return ['refuse', `${res.status}`];
	const [result] = (await res.json()).results;
	if (result.status === 'rejected' && result.reason === 'forbidden')
		// A refusal of the rulebook is said in the product's words: a sentence, no field names.
		expect(result.message, JSON.stringify(result)).toMatch(/^[A-Z][a-z][^_{}]*[a-z.]$/);
	const ok = result.status === 'applied' || result.status === 'merged';
	return [ok ? 'allow' : 'refuse', JSON.stringify(result)];
}

beforeAll(async () => {
	a = await makeWorkshop('Rulebook A');
	b = await makeWorkshop('Rulebook B');
	leadA = a.users.lead.actor;
	for (const r of ['owner', 'lead', 'technician', 'apprentice'] as const) client[r] = await signedIn(a, r);
	client.otherLead = await signedIn(b, 'lead');
	client.signedOut = new Client(inject('baseURL'), '10.9.9.9');
	componentId = ((await components.create(leadA, { partNumber: `RB-COIL-${uuidv7().slice(-6)}`, kind: 'ignition_coil' })) as T).id;
	sheetId = (await approved()).id;
	await savePricing(leadA, { currency: 'GBP', taxRateBp: 2000, labourRateMinor: 6000, diagnosticFeeMinor: 4000 });
	const van = (await vehicles.create(leadA, { make: 'Volta', model: 'Hauler', chassisNo: 'VH-9', chassisReason: 'Prototype', hybrid: true })) as T;
	hybridVan = van.id;
	plainCar = ((await vehicles.create(leadA, { make: 'Norvik', model: 'Tessa', chassisNo: 'NV-2', chassisReason: 'Imported before VINs' })) as T).id;
}, 120_000);

describe(`the rulebook: ${TOTAL} cases (${ROLES.length} roles × ${ACTIONS.length} actions × the channels that offer each)`, () => {
	const groups = [
		['photos', (x: Action) => /photo/.test(x.name)],
		['jobs', (x: Action) => /job/.test(x.name) && !x.read && !/test|reading|sign off/.test(x.name)],
		['customers and vehicles', (x: Action) => /customer|vehicle/.test(x.name)],
		['tests, readings, spark and swap tests, sign-offs', (x: Action) => /test|reading|sign off/.test(x.name) && !x.read],
		['the spec library', (x: Action) => /component|sheet|caution/.test(x.name)],
		['clashes and reads', (x: Action) => /clash/.test(x.name) || !!x.read],
		['the workshop’s settings', (x: Action) => /workshop’s/.test(x.name)]
	] as const;
	const seen = new Set<Action>();
	const byGroup = groups.map(([label, match]) => {
		const list = ACTIONS.filter((x) => !seen.has(x) && match(x));
		list.forEach((x) => seen.add(x));
		return [label, list] as const;
	});

	it('sorts every action into one group', () => {
		expect(ACTIONS.filter((x) => !seen.has(x)).map((x) => x.name)).toEqual([]);
	});

	for (const [label, list] of byGroup) {
		const size = list.reduce((n, x) => n + ROLES.length * CHANNELS(x).length, 0);
		it(`${label}: ${size} cases, each channel as expected and all channels agreeing`, async () => {
			const cases: Case[] = [];
			for (const x of list)
				for (const role of ROLES)
					for (const channel of CHANNELS(x)) {
						const t = await x.setup(role);
						const expected: Outcome = x.allowed.includes(role) ? 'allow' : 'refuse';
						if (x.read) {
							const shown = await x.read[channel]!(t, role);
							cases.push({ action: x.name, role, channel, expected, got: shown ? 'allow' : 'refuse', landed: null, detail: '' });
							continue;
						}
						const [got, detail] = await attempt(x, channel, t, role);
						cases.push({ action: x.name, role, channel, expected, got, landed: await x.landed!(t, role), detail });
					}
			expect(cases).toHaveLength(size);
			const wrong = cases.filter((c) => c.got !== c.expected || (c.landed !== null && c.landed !== (c.expected === 'allow')));
			expect(wrong.map((c) => `${c.action} · ${c.role} · ${c.channel}: expected ${c.expected}, got ${c.got}, landed ${c.landed} — ${c.detail}`)).toEqual([]);
			// The channels agree: one outcome per role and action, whatever the channel.
			const outcomes = new Map<string, Set<Outcome>>();
			for (const c of cases) {
				const k = `${c.action} · ${c.role}`;
				outcomes.set(k, (outcomes.get(k) ?? new Set()).add(c.got));
			}
			expect([...outcomes].filter(([, s]) => s.size > 1).map(([k]) => k)).toEqual([]);
		}, 300_000);
	}
});

describe('what a phone’s pull carries', () => {
	it('never carries another technician’s job, nor anything of another workshop', async () => {
		const theirs = await job(a.users.apprentice.id);
		const theirTest = await testOn(leadA, theirs.id);
		const mine = await job(a.users.technician.id);
		const elsewhere = (await jobs.create(b.users.lead.actor, { complaint: 'Other workshop', assigneeId: b.users.technician.id })) as T;
		const { changes } = await pullAll(client.technician, 0, 1000);
		const ids = new Set(changes.map((c) => c.entityId));
		expect(ids.has(mine.id)).toBe(true);
		expect(ids.has(theirs.id)).toBe(false);
		expect(ids.has(theirTest.id)).toBe(false);
		expect(ids.has(elsewhere.id)).toBe(false);
		const bIds = await db().query<{ id: string }>(
			'SELECT entity_id AS id FROM changes WHERE workshop_id = ?',
			{ replacements: [b.workshop.id], type: QueryTypes.SELECT }
		);
		expect(bIds.length).toBeGreaterThan(0);
		expect(bIds.filter((r) => ids.has(r.id))).toEqual([]);
		// Every job it carries is the technician's (an `evict` carries none: a job taken away).
		for (const c of changes)
			if (c.entity === 'job' && c.op !== 'evict')
				expect(c.record?.assigneeId, `job ${c.entityId}`).toBe(a.users.technician.id);
	});

	it('gives a new job the server’s number, which the phone learns through pull', async () => {
		const id = uuidv7();
		const r = await client.technician.json('POST', '/api/sync/push', {
			deviceId: 'rb-number',
			ops: [create('job', { complaint: `Numbered ${tagOf()}`, number: 1 }, id)]
		});
		expect((await r.json()).results[0].status).toBe('applied');
		const pulled = (await pullAll(client.technician, 0, 1000)).changes.find((c) => c.entityId === id);
		expect(pulled?.record?.number).toBeGreaterThan(1000);
		expect(pulled?.record?.assigneeId).toBe(a.users.technician.id);
	});

	it('refuses the fields the server owns in any channel: the API ignores them, sync refuses the push', async () => {
		const tag = tagOf();
		const res = await client.technician.json('POST', '/api/jobs', {
			complaint: tag,
			workshopId: b.workshop.id,
			createdBy: a.users.owner.id,
			version: 9
		});
		expect(res.status).toBe(201);
		const row = (await db().query<Record<string, unknown>>('SELECT * FROM jobs WHERE complaint = ?', { replacements: [tag], type: QueryTypes.SELECT }))[0];
		expect(row).toMatchObject({ workshop_id: a.workshop.id, created_by: a.users.technician.id, version: 1 });
		for (const field of ['workshopId', 'createdBy', 'version']) {
			const push = await client.technician.json('POST', '/api/sync/push', {
				deviceId: 'rb-owned',
				ops: [create('job', { complaint: `${tag} ${field}`, [field]: field === 'version' ? 9 : b.workshop.id })]
			});
			expect(push.status, field).toBe(400);
		}
		expect(await count('SELECT COUNT(*) AS n FROM jobs WHERE complaint LIKE ?', `${tag} %`)).toBe(0);
	});
});
