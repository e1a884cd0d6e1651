/**
 * Circuit tests (battery, parasitic draw, relay, charging) at the lead's desk, through the real
 * endpoints: an apprentice's circuit test waits for a lead's sign-off like a coil test (the
 * rulebook, the desk's list and count, the job page's form, sync), the closing rule counts
 * them, and the overview counts them per kind and per person, with the phone's differing
 * results.
 *
 * Figures are those of the judge's sourced unit tests (tests/unit/flow/circuit.test.ts):
 *  - battery: 12.24 V at 80 °F is 50 % charged (Battery Council International's table) →
 *    charge and re-test (can't tell);
 *  - parasitic draw: 120 mA against the common-practice 50 mA → over spec;
 *  - relay: coil 120 Ω against 85 Ω ± 10 % (relay makers' data sheets) → over spec;
 *  - charging: 14.2 V / 13.9 V and 0.2 V AC ripple within 13.5–14.8 V, under 0.5 V AC
 *    (common practice) → OK.
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { parseCsv } from '../../src/lib/csv';
import { db } from '../../src/lib/server/db';
import { jobs } from '../../src/lib/server/services/jobs';
import { countWaiting } from '../../src/lib/server/services/signoffs';
import { defaultsFor } from '../../src/lib/flow/circuit';
import { deskWorkshop } from '../helpers/desk';
import type { Client } from '../helpers/http';
import { expectError } from '../helpers/records';
import { create, op, push } from '../helpers/sync';

const base = inject('baseURL');
let w: Awaited<ReturnType<typeof deskWorkshop>>;

const BATTERY = { batteryType: 'flooded', standard: 'sae_j537', ratedA: 600, tempC: (80 - 32) * (5 / 9), surfaceGone: true, restV: 12.24, method: 'conductance', measuredA: 250, minCapability: 75 };
const DRAW = { capacityAh: 70, usablePct: 50, drawMa: 120, limitMa: 50 };
const RELAY = { ...defaultsFor('relay'), coilOhm: 120, clicks: 'yes', contactV: 0.015 };
const CHARGING = { minV: 13.5, maxV: 14.8, rippleMaxV: 0.5, offV: 14.2, onV: 13.9, rippleV: 0.2 };

const rows = (sql: string, ...replacements: unknown[]) =>
	db().query<Record<string, unknown>>(sql, { replacements, type: QueryTypes.SELECT });
const current = async (jobId: string) => (await rows('SELECT version, status FROM jobs WHERE id = ?', jobId))[0] as { version: number; status: string };
const closeApi = async (c: Client, jobId: string) =>
	c.json('POST', `/api/jobs/${jobId}/status`, { status: 'closed', baseVersion: (await current(jobId)).version });
const html = async (c: Client, path: string) => (await (await c.get(path, 'text/html')).text()).replace(/\s+/g, ' ');

async function pushAll(c: Client, ops: ReturnType<typeof create>[]) {
	const results = await push(c, `phone-${uuidv7().slice(-6)}`, ops);
	expect(results.map((r) => r.status), JSON.stringify(results)).toEqual(ops.map(() => 'applied'));
}

let appJob: string;
let techJob: string;
let battery: string;
let drawFirst: string;
let drawAgain: string;

beforeAll(async () => {
	w = await deskWorkshop(base, 'Circuit desk');
	const lead = w.users.lead.actor;
	appJob = (await jobs.create(lead, { complaint: 'Flat every morning', assigneeId: w.users.apprentice.id, status: 'repaired' })).id as string;
	techJob = (await jobs.create(lead, { complaint: 'Starter clicks', assigneeId: w.users.technician.id })).id as string;
	const b = create('circuit_test', { jobId: appJob, kind: 'battery', inputs: BATTERY, deviceResult: { verdict: 'charge_retest' } });
	const d = create('circuit_test', { jobId: appJob, kind: 'parasitic', inputs: DRAW, deviceResult: { verdict: 'high' } });
	[battery, drawFirst] = [b.entityId, d.entityId];
	await pushAll(w.as.apprentice, [b, d]);
	await pushAll(w.as.technician, [
		// The phone said OK; the workshop's check of the same figures says over spec.
		create('circuit_test', { jobId: techJob, kind: 'relay', inputs: RELAY, deviceResult: { verdict: 'ok' } }),
		create('circuit_test', { jobId: techJob, kind: 'charging', inputs: CHARGING, deviceResult: { verdict: 'ok' } })
	]);
});

describe('an apprentice’s circuit test waits for a lead, like a coil test', () => {
	it('is marked by the server from the session, counted on the desk and listed with a link to it', async () => {
		const stored = await rows('SELECT kind, needs_signoff FROM circuit_tests WHERE job_id IN (?, ?) ORDER BY seq', appJob, techJob);
		expect(stored.map((r) => [r.kind, Number(r.needs_signoff)])).toEqual([['battery', 1], ['parasitic', 1], ['relay', 0], ['charging', 0]]);
		expect(await countWaiting(w.users.lead.actor)).toBe(2);
		const page = await html(w.as.lead, '/signoffs');
		expect(page).toContain('2 tests wait for your sign-off');
		expect(page).toContain('Battery test');
		expect(page).toContain(`/jobs/${appJob}#circuit-${battery}`);
		const job = await html(w.as.lead, `/jobs/${appJob}`);
		expect(job).toContain(`id="circuit-${battery}"`);
		expect(job.match(/data-signoff="waiting"/g)).toHaveLength(2);
		expect(job.match(/data-testid="signoff-form"/g)).toHaveLength(2);
	});

	it('refuses a sign-off by the apprentice, and on a technician’s circuit test', async () => {
		const mine = await expectError(await w.as.apprentice.json('POST', `/api/tests/${battery}/signoff`, {}), 403, 'forbidden');
		expect(mine.message).toBe('Only a workshop lead or owner can sign off a test');
		const [relay] = await rows("SELECT id FROM circuit_tests WHERE job_id = ? AND kind = 'relay'", techJob);
		const tech = await expectError(await w.as.lead.json('POST', `/api/tests/${relay.id}/signoff`, {}), 403, 'forbidden');
		expect(tech.message).toBe('Only a test done by an apprentice needs a sign-off');
		expect(await rows('SELECT id FROM signoffs WHERE test_id IN (?, ?)', battery, relay.id)).toEqual([]);
	});

	it('keeps the job open until every apprentice circuit test is signed off; one sent back and done again waits anew', async () => {
		const refused = await expectError(await closeApi(w.as.lead, appJob), 403, 'forbidden');
		expect(refused.message).toBe('The job cannot be closed yet: 2 tests by an apprentice are not signed off yet.');

		// The battery signed off at the desk; the draw sent back from the lead's phone.
		const signed = await w.as.lead.json('POST', `/api/tests/${battery}/signoff`, {});
		expect(signed.status, await signed.clone().text()).toBe(201);
		const back = create('signoff', { testId: drawFirst, mode: 'witnessed', decision: 'sent_back', note: 'Wait for the modules to sleep before reading.' });
		expect((await push(w.as.lead, 'lead-phone', [back]))[0].status).toBe('applied');
		expect((await expectError(await closeApi(w.as.lead, appJob), 403, 'forbidden')).message).toBe(
			'The job cannot be closed yet: one test by an apprentice is not signed off yet.'
		);
		const list = await html(w.as.lead, '/signoffs');
		expect(list).toContain('No test waits for a sign-off');
		expect(list).toContain('Sent back, waiting for the apprentice');
		expect(await countWaiting(w.users.lead.actor)).toBe(0);

		// Done again: the one sent back is replaced, the new one waits for its own sign-off.
		const again = create('circuit_test', { jobId: appJob, kind: 'parasitic', inputs: DRAW });
		drawAgain = again.entityId;
		await pushAll(w.as.apprentice, [again]);
		expect(await countWaiting(w.users.lead.actor)).toBe(1);
		const waiting = await html(w.as.lead, '/signoffs');
		expect(waiting).toContain(`#circuit-${drawAgain}`);
		expect(waiting).not.toContain(`#circuit-${drawFirst}`);
		expect((await expectError(await closeApi(w.as.lead, appJob), 403, 'forbidden')).message).toBe(
			'The job cannot be closed yet: one test by an apprentice is not signed off yet.'
		);

		// Signed off with the job page's form; then the job closes.
		const form = await fetch(`${w.as.lead.base}/jobs/${appJob}?/signoff`, {
			method: 'POST',
			headers: w.as.lead.headers({ 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json', 'x-sveltekit-action': 'true' }),
			body: new URLSearchParams({ testId: drawAgain, decision: 'signed' }).toString()
		}).then((r) => r.json());
		expect(form.type, JSON.stringify(form)).toBe('success');
		const v = await current(appJob);
		expect((await push(w.as.lead, 'lead-phone', [op('job', 'patch', appJob, { status: 'closed' }, v.version)]))[0].status).toBe('applied');
		expect((await current(appJob)).status).toBe('closed');
	});
});

describe('the overview counts circuit tests', () => {
	type Overview = {
		circuits: { kind: string; title: string; tests: number; outOfSpec: number; cantTell: number; ok: number; differ: number; waiting: number }[];
		people: { id: string; tests: number; finished: number; waiting: number }[];
	};
	const overview = async (q = '') => (await (await w.as.lead.get(`/api/overview${q}`)).json()) as Overview;

	it('per kind, with the phone’s differing results and the sign-offs still waiting, and with each person’s tests', async () => {
		const o = await overview();
		const byKind = Object.fromEntries(o.circuits.map(({ kind, title: _t, ...r }) => [kind, r]));
		expect(byKind).toEqual({
			battery: { tests: 1, outOfSpec: 0, cantTell: 1, ok: 0, differ: 0, waiting: 0, failRate: 0 },
			parasitic: { tests: 2, outOfSpec: 2, cantTell: 0, ok: 0, differ: 0, waiting: 0, failRate: 1 },
			relay: { tests: 1, outOfSpec: 1, cantTell: 0, ok: 0, differ: 1, waiting: 0, failRate: 1 },
			charging: { tests: 1, outOfSpec: 0, cantTell: 0, ok: 1, differ: 0, waiting: 0, failRate: 0 }
		});
		expect(o.circuits.map((r) => r.title)).toEqual(['Battery test', 'Charging test', 'Parasitic draw', 'Relay test']);
		const person = (id: string) => o.people.find((p) => p.id === id)!;
		expect(person(w.users.apprentice.id)).toMatchObject({ tests: 3, finished: 3, waiting: 0 });
		expect(person(w.users.technician.id)).toMatchObject({ tests: 2, finished: 2 });

		// An apprentice's circuit test with no decision yet waits, on its kind and on the person.
		const job = (await jobs.create(w.users.lead.actor, { complaint: 'Dim lights', assigneeId: w.users.apprentice.id })).id as string;
		await pushAll(w.as.apprentice, [create('circuit_test', { jobId: job, kind: 'battery', inputs: BATTERY })]);
		const later = await overview('?circuitsSort=-tests');
		expect(later.circuits.find((r) => r.kind === 'battery')).toMatchObject({ tests: 2, waiting: 1 });
		expect(later.circuits[0].kind).toMatch(/battery|parasitic/);
		expect(later.people.find((p) => p.id === w.users.apprentice.id)).toMatchObject({ tests: 4, waiting: 1 });

		// The same table as CSV (the library's conventions: `;` with decimal commas).
		const csv = await w.as.lead.get('/api/overview/csv?table=circuits&delimiter=semicolon&circuitsSort=kind');
		expect(csv.status).toBe(200);
		expect(csv.headers.get('content-disposition')).toMatch(/filename="fieldbench-circuits-/);
		const rows = parseCsv(await csv.text()).rows.map((x) => x.cells);
		expect(rows[0]).toEqual(['test', 'kind', 'tests', 'out_of_spec', 'cant_tell', 'ok', 'phone_differed', 'waiting_signoff', 'out_of_spec_pct']);
		expect(rows.slice(1)).toEqual([
			['Battery test', 'battery', '2', '0', '2', '0', '0', '1', '0'], // both batteries too flat to judge: can't tell
			['Charging test', 'charging', '1', '0', '0', '1', '0', '0', '0'],
			['Parasitic draw', 'parasitic', '2', '2', '0', '0', '0', '0', '100'],
			['Relay test', 'relay', '1', '1', '0', '0', '1', '0', '100']
		]);

		const page = await html(w.as.lead, '/overview');
		expect(page).toContain('data-testid="circuits-table"');
		expect(page).toContain('table=circuits');
		const relayRow = /<tr[^>]*data-kind="relay"[^]*?<\/tr>/.exec(page)?.[0] ?? '';
		expect(relayRow).toContain('Relay test');
		expect(relayRow.replace(/<!--[^]*?-->/g, '')).toMatch(/<span aria-hidden="true" class="mr-1">⚑<\/span>1<\/td>/);
	});
});
