/**
 * Sign-offs of apprentice work and the closing rules of a job, through the JSON API, the
 * office's form actions and a phone's sync push (DESIGN §2.3, §2.7, §6):
 *  - an apprentice's test waits for a lead or owner, who signs it off at the car on their
 *    own phone ("witnessed", through sync) or from the desk ("remote", the JSON API or the
 *    job page's form), or sends it back with a note; the signer is always the signed-in user;
 *  - "Re-tested OK" needs a finished re-test of the same part and positions that reads
 *    nothing out of spec; "Closed" needs no open clash on the job and every apprentice test
 *    signed off; the refusal says what is missing in one sentence, the same in every channel.
 *
 * Figures: the invented coil of `helpers/desk.ts`, cold spec 0.36–0.55 Ω (common practice
 * for a pencil coil's primary winding, no published source), measured at 20 °C, leads
 * 0.10 Ω subtracted: 0.60 Ω read → 0.50 Ω OK; 0.80 Ω read → 0.70 Ω over spec.
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { jobs } from '../../src/lib/server/services/jobs';
import { readOverview, parseOverviewQuery } from '../../src/lib/server/services/overview';
import { countWaiting } from '../../src/lib/server/services/signoffs';
import { deskWorkshop, meter } from '../helpers/desk';
import type { Client } from '../helpers/http';
import { expectError } from '../helpers/records';
import { create, op, pullAll, push } from '../helpers/sync';

const base = inject('baseURL');
let w: Awaited<ReturnType<typeof deskWorkshop>>;

type Row = Record<string, unknown>;
const rows = (sql: string, ...replacements: unknown[]) =>
	db().query<Row>(sql, { replacements, type: QueryTypes.SELECT });

/** A job of the workshop assigned to `who` (by the lead). */
async function jobFor(who: 'apprentice' | 'technician', status?: string) {
	return (await jobs.create(w.users.lead.actor, {
		complaint: `Misfire ${uuidv7().slice(-8)}`,
		assigneeId: w.users[who].id,
		...(status ? { status } : {})
	})) as { id: string; version: number };
}

/** The ops of a finished coil test on cylinders `positions`, read `raw` ohms each. */
function testOps(
	jobId: string,
	raw: number,
	o: {
		positions?: string;
		retestOf?: string;
		partNumber?: string;
		componentId?: string | null;
	} = {}
) {
	const t = create('test', {
		jobId,
		componentId: o.componentId === undefined ? w.componentId : o.componentId,
		sheetId: w.sheetId,
		partNumber: o.partNumber ?? w.partNumber,
		position: o.positions ?? '1,2',
		meter: meter('Bench meter', 0.1),
		temperature: { mode: 'measured', tempC: 20 },
		state: 'done',
		...(o.retestOf ? { retestOf: o.retestOf } : {})
	});
	const readings = (o.positions ?? '1,2')
		.split(',')
		.map((position) =>
			create('reading', {
				testId: t.entityId,
				checkKey: 'primary',
				position,
				samples: [{ value: raw, unit: 'Ω' }],
				rangeLabel: '200 Ω'
			})
		);
	return { id: t.entityId, ops: [t, ...readings] };
}

/** Record a finished test through `who`'s phone; returns its id. */
async function recordTest(
	c: Client,
	jobId: string,
	raw: number,
	o: Parameters<typeof testOps>[2] = {}
) {
	const { id, ops } = testOps(jobId, raw, o);
	const results = await push(c, `phone-${uuidv7().slice(-6)}`, ops);
	expect(
		results.map((r) => r.status),
		JSON.stringify(results)
	).toEqual(ops.map(() => 'applied'));
	return id;
}

const signoff = (testId: string, fields: Record<string, unknown> = {}) =>
	create('signoff', { testId, mode: 'witnessed', ...fields });

/** The test as the job's tests API shows it. */
async function shown(c: Client, jobId: string, testId: string) {
	const r = await c.get(`/api/jobs/${jobId}/tests`);
	expect(r.status).toBe(200);
	return (
		(await r.json()).tests as {
			id: string;
			signOff: Record<string, unknown>;
			needsSignOff: boolean;
			retestOf: string | null;
		}[]
	).find((t) => t.id === testId)!;
}

const statusApi = (c: Client, job: { id: string; version: number }, status: string) =>
	c.json('POST', `/api/jobs/${job.id}/status`, { status, baseVersion: job.version });

const current = async (jobId: string) =>
	(await rows('SELECT version, status FROM jobs WHERE id = ?', jobId))[0] as {
		version: number;
		status: string;
	};

beforeAll(async () => {
	w = await deskWorkshop(base, 'Signoffs');
}, 60_000);

describe('an apprentice’s test waits for a lead’s sign-off', () => {
	it('is marked by the server when an apprentice starts it, never by the phone', async () => {
		const job = await jobFor('apprentice');
		const { id, ops } = testOps(job.id, 0.6);
		(ops[0].fields as Row).needsSignOff = false; // the phone cannot say it needs none
		expect(
			(await push(w.as.apprentice, 'app-phone', ops)).every((r) => r.status === 'applied')
		).toBe(true);
		const pulled = (await pullAll(w.as.apprentice)).changes.find((c) => c.entityId === id);
		expect(pulled?.record).toMatchObject({
			needsSignOff: true,
			technicianId: w.users.apprentice.id
		});
		expect((await shown(w.as.lead, job.id, id)).signOff).toMatchObject({
			kind: 'waiting',
			text: 'Waiting for sign-off'
		});

		const techJob = await jobFor('technician');
		const techTest = await recordTest(w.as.technician, techJob.id, 0.6);
		expect((await shown(w.as.lead, techJob.id, techTest)).signOff.kind).toBe('not_needed');
	});

	it('is signed off from the desk through the JSON API, the signer being the signed-in lead', async () => {
		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		expect(await countWaiting(w.users.lead.actor)).toBeGreaterThanOrEqual(1);
		const before = await countWaiting(w.users.lead.actor);
		const r = await w.as.lead.json('POST', `/api/tests/${id}/signoff`, {
			createdBy: w.users.owner.id,
			signedBy: w.users.owner.id
		});
		const text = await r.text();
		expect(r.status, text).toBe(201);
		const { signoff: made } = JSON.parse(text);
		expect(made).toMatchObject({
			testId: id,
			jobId: job.id,
			mode: 'remote',
			decision: 'signed',
			createdBy: w.users.lead.id
		});
		expect(await countWaiting(w.users.lead.actor)).toBe(before - 1);
		const view = (await shown(w.as.apprentice, job.id, id)).signOff;
		expect(view).toMatchObject({ kind: 'signed', text: 'Signed off' });
		expect(view.by).toContain('read at the desk');
		// The apprentice's phone learns it at its next pull.
		const pulled = (await pullAll(w.as.apprentice)).changes.find((c) => c.entityId === made.id);
		expect(pulled?.record).toMatchObject({ decision: 'signed', createdBy: w.users.lead.id });
		// An audit row says who signed off.
		expect(
			await rows(
				"SELECT user_id FROM audit_log WHERE entity = 'signoff' AND entity_id = ? AND field = 'decision'",
				made.id
			)
		).toEqual([{ user_id: w.users.lead.id }]);
	});

	it('is signed off on the lead’s phone beside the apprentice (witnessed, through sync)', async () => {
		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const s = signoff(id, { createdBy: w.users.apprentice.id });
		expect(
			(await w.as.owner.json('POST', '/api/sync/push', { deviceId: 'owner-phone', ops: [s] }))
				.status
		).toBe(400); // the signer is never a field
		const ok = signoff(id);
		expect((await push(w.as.owner, 'owner-phone', [ok]))[0].status).toBe('applied');
		expect(
			(await rows('SELECT created_by, mode, decision FROM signoffs WHERE id = ?', ok.entityId))[0]
		).toEqual({
			created_by: w.users.owner.id,
			mode: 'witnessed',
			decision: 'signed'
		});
		expect((await shown(w.as.lead, job.id, id)).signOff.by).toContain('watched at the car');
	});

	it('refuses anyone but a lead or owner, in every channel, with the same words', async () => {
		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const api = await w.as.apprentice.json('POST', `/api/tests/${id}/signoff`, {});
		expect((await expectError(api, 403, 'forbidden')).message).toBe(
			'Only a workshop lead or owner can sign off a test'
		);
		const [synced] = await push(w.as.apprentice, 'app-phone', [signoff(id)]);
		expect(synced).toMatchObject({
			status: 'rejected',
			reason: 'forbidden',
			message: 'Only a workshop lead or owner can sign off a test'
		});
		// A technician does not see the apprentice's job at all.
		await expectError(
			await w.as.technician.json('POST', `/api/tests/${id}/signoff`, {}),
			404,
			'not_found'
		);
		expect((await push(w.as.technician, 'tech-phone', [signoff(id)]))[0]).toMatchObject({
			status: 'rejected',
			reason: 'not_found'
		});
		expect(await rows('SELECT id FROM signoffs WHERE test_id = ?', id)).toEqual([]);
	});

	it('refuses a test no apprentice did, and a second sign-off', async () => {
		const techJob = await jobFor('technician');
		const techTest = await recordTest(w.as.technician, techJob.id, 0.6);
		const e = await expectError(
			await w.as.lead.json('POST', `/api/tests/${techTest}/signoff`, {}),
			403,
			'forbidden'
		);
		expect(e.message).toBe('Only a test done by an apprentice needs a sign-off');
		expect((await push(w.as.lead, 'lead-phone', [signoff(techTest)]))[0]).toMatchObject({
			reason: 'forbidden',
			message: e.message
		});

		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const both = await push(w.as.lead, 'lead-phone', [signoff(id), signoff(id)]);
		expect(both.map((r) => r.status)).toEqual(['applied', 'rejected']);
		expect(both[1].reason).toBe('forbidden');
		const again = await expectError(
			await w.as.owner.json('POST', `/api/tests/${id}/signoff`, {}),
			403,
			'forbidden'
		);
		expect(again.message).toBe('This test is already signed off');
	});

	it('is sent back with a note the apprentice sees, and waits again once read again', async () => {
		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const noNote = await expectError(
			await w.as.lead.json('POST', `/api/tests/${id}/signoff`, {
				decision: 'sent_back',
				note: '  '
			}),
			400,
			'invalid'
		);
		expect(noNote.fields?.note).toBe('Say what the apprentice should do again');
		expect(
			(await push(w.as.lead, 'lead-phone', [signoff(id, { decision: 'sent_back' })]))[0]
		).toMatchObject({ status: 'rejected', reason: 'invalid' });

		const note = 'Read cylinder 2 again on the 200 Ω range with the leads zeroed';
		const r = await w.as.lead.json('POST', `/api/tests/${id}/signoff`, {
			decision: 'sent_back',
			note
		});
		expect(r.status).toBe(201);
		expect((await shown(w.as.apprentice, job.id, id)).signOff).toMatchObject({
			kind: 'sent_back',
			text: 'Sent back',
			note
		});
		const listed = await (await w.as.lead.get('/signoffs', 'text/html')).text();
		expect(listed).toContain('Sent back, waiting for the apprentice');

		// The apprentice reads cylinder 2 again: the test waits for the lead again.
		const again = create('reading', {
			testId: id,
			checkKey: 'primary',
			position: '2',
			samples: [{ value: 0.61, unit: 'Ω' }],
			rangeLabel: '200 Ω'
		});
		expect((await push(w.as.apprentice, 'app-phone', [again]))[0].status).toBe('applied');
		expect((await shown(w.as.lead, job.id, id)).signOff).toMatchObject({
			kind: 'waiting',
			earlierNote: note
		});
		const [summary] = await rows(
			'SELECT signoff, revised FROM test_summaries WHERE test_id = ?',
			id
		);
		expect(summary).toEqual({ signoff: 'sent_back', revised: 1 });
	});

	it('is signed off through the office job page’s form, and shows on the overview per person', async () => {
		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const q = parseOverviewQuery({ from: '2020-01-01' });
		const waitingOf = async () =>
			(await readOverview(w.users.lead.actor, q)).people.find(
				(p) => p.id === w.users.apprentice.id
			)!.waiting;
		const before = await waitingOf();
		const form = (fields: Record<string, string>, c = w.as.lead) =>
			fetch(`${c.base}/jobs/${job.id}?/signoff`, {
				method: 'POST',
				headers: c.headers({
					'content-type': 'application/x-www-form-urlencoded',
					accept: 'application/json',
					'x-sveltekit-action': 'true'
				}),
				body: new URLSearchParams(fields).toString()
			}).then((r) => r.json() as Promise<{ type: string; status?: number; data?: string }>);
		const refused = await form({ testId: id, decision: 'signed' }, w.as.apprentice);
		expect(refused).toMatchObject({ type: 'failure', status: 403 });
		expect(await form({ testId: id, decision: 'signed' })).toMatchObject({ type: 'success' });
		expect((await shown(w.as.lead, job.id, id)).signOff.kind).toBe('signed');
		expect(await waitingOf()).toBe(before - 1);
		expect(before).toBeGreaterThanOrEqual(1);
	});

	it('keeps a sent-back test out of the customer’s report until it is signed off', async () => {
		const job = await jobFor('apprentice');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const preview = async () => {
			const r = await w.as.lead.get(`/jobs/${job.id}/report`, 'text/html');
			expect(r.status).toBe(200);
			return r.text();
		};
		await w.as.lead.json('POST', `/api/tests/${id}/signoff`, {
			decision: 'sent_back',
			note: 'Photograph the connector'
		});
		expect(await preview()).toContain('data-testid="awaiting-sign-off"');
		const { gatherFacts, jobWithParties } = await import('../../src/lib/server/reports/facts');
		const { readReportSettings } = await import('../../src/lib/server/reports/settings');
		const facts = async () =>
			gatherFacts(
				w.users.lead.actor,
				await jobWithParties(w.users.lead.actor, job.id),
				await readReportSettings(w.workshop.id),
				{
					recommendations: []
				} as never
			);
		expect((await facts()).awaitingSignOff).toBe(1);
		await w.as.lead.json('POST', `/api/tests/${id}/signoff`, {});
		const after = await facts();
		expect(after.awaitingSignOff).toBe(0);
		expect(after.facts.tests).toHaveLength(1);
		expect(await preview()).not.toContain('data-testid="awaiting-sign-off"');
	});
});

describe('“Re-tested OK” needs a re-test after the repair', () => {
	const missing =
		'Re-tested OK needs a re-test after the repair: open the first test of the repaired part and press Re-test.';

	it('refuses it with no re-test, through the JSON API and sync alike', async () => {
		const job = await jobFor('technician', 'repaired');
		await recordTest(w.as.technician, job.id, 0.8);
		const v = await current(job.id);
		const e = await expectError(
			await statusApi(w.as.technician, { id: job.id, version: v.version }, 'retested_ok'),
			403,
			'forbidden'
		);
		expect(e.message).toBe(missing);
		const [synced] = await push(w.as.technician, 'tech-phone', [
			op('job', 'patch', job.id, { status: 'retested_ok' }, v.version)
		]);
		expect(synced).toMatchObject({ status: 'rejected', reason: 'forbidden', message: missing });
		expect((await current(job.id)).status).toBe('repaired');
	});

	it('links a re-test only to the first test of the same part and positions on the same job', async () => {
		const job = await jobFor('technician', 'repaired');
		const first = await recordTest(w.as.technician, job.id, 0.8, { positions: '1,2,3' });
		const wrong = async (o: Parameters<typeof testOps>[2], jobId = job.id) => {
			const [r] = await push(w.as.technician, 'tech-phone', [testOps(jobId, 0.6, o).ops[0]]);
			expect(r).toMatchObject({ status: 'rejected', reason: 'invalid' });
			return r as { message?: string };
		};
		expect((await wrong({ retestOf: first, positions: '3,4' })).message).toMatch(
			/positions of its first test \(1, 2, 3\)/
		);
		expect(
			(await wrong({ retestOf: first, partNumber: 'OTHER-1', componentId: null })).message
		).toBe('A re-test is of the same part as its first test');
		const otherJob = await jobFor('technician');
		expect((await wrong({ retestOf: first }, otherJob.id)).message).toMatch(/same job/);
		const retest = await recordTest(w.as.technician, job.id, 0.6, {
			retestOf: first,
			positions: '3'
		});
		expect((await wrong({ retestOf: retest, positions: '3' })).message).toMatch(
			/first test, not to another re-test/
		);
		expect((await shown(w.as.lead, job.id, retest)).retestOf).toBe(first);
	});

	it('refuses while the re-test still reads out of spec, and allows it once it reads OK', async () => {
		const job = await jobFor('technician', 'repaired');
		const first = await recordTest(w.as.technician, job.id, 0.8, { positions: '3' });
		const retest = await recordTest(w.as.technician, job.id, 0.8, {
			retestOf: first,
			positions: '3'
		});
		let v = await current(job.id);
		const e = await expectError(
			await statusApi(w.as.lead, { id: job.id, version: v.version }, 'retested_ok'),
			403,
			'forbidden'
		);
		expect(e.message).toBe(
			`The re-test of ${w.partNumber} (cylinder 3) still reads out of spec, so the job is not re-tested OK.`
		);
		// The new coil seated properly and read again: OK.
		const again = create('reading', {
			testId: retest,
			checkKey: 'primary',
			position: '3',
			samples: [{ value: 0.6, unit: 'Ω' }],
			rangeLabel: '200 Ω'
		});
		expect((await push(w.as.technician, 'tech-phone', [again]))[0].status).toBe('applied');
		v = await current(job.id);
		const [moved] = await push(w.as.technician, 'tech-phone', [
			op('job', 'patch', job.id, { status: 'retested_ok' }, v.version)
		]);
		expect(moved.status).toBe('applied');
		expect((await current(job.id)).status).toBe('retested_ok');
	});

	it('is allowed through the JSON API once a finished re-test reads OK', async () => {
		const job = await jobFor('technician', 'repaired');
		const first = await recordTest(w.as.technician, job.id, 0.8);
		await recordTest(w.as.technician, job.id, 0.6, { retestOf: first });
		const r = await statusApi(
			w.as.technician,
			{ id: job.id, version: (await current(job.id)).version },
			'retested_ok'
		);
		expect(r.status, await r.clone().text()).toBe(200);
	});
});

describe('“Closed” needs no open clash and every apprentice test signed off', () => {
	it('refuses while an apprentice test waits, in every channel, and closes once it is signed off', async () => {
		const job = await jobFor('apprentice', 'repaired');
		const id = await recordTest(w.as.apprentice, job.id, 0.6);
		const sentence =
			'The job cannot be closed yet: one test by an apprentice is not signed off yet.';
		let v = await current(job.id);
		expect(
			(
				await expectError(
					await statusApi(w.as.lead, { id: job.id, version: v.version }, 'closed'),
					403,
					'forbidden'
				)
			).message
		).toBe(sentence);
		expect(
			(
				await push(w.as.lead, 'lead-phone', [
					op('job', 'patch', job.id, { status: 'closed' }, v.version)
				])
			)[0]
		).toMatchObject({
			status: 'rejected',
			reason: 'forbidden',
			message: sentence
		});
		const page = await fetch(`${w.as.lead.base}/jobs/${job.id}?/status`, {
			method: 'POST',
			headers: w.as.lead.headers({
				'content-type': 'application/x-www-form-urlencoded',
				accept: 'application/json',
				'x-sveltekit-action': 'true'
			}),
			body: new URLSearchParams({ status: 'closed', baseVersion: String(v.version) }).toString()
		}).then((r) => r.json());
		expect(page).toMatchObject({ type: 'failure', status: 403 });
		expect(page.data).toContain(sentence);

		await w.as.lead.json('POST', `/api/tests/${id}/signoff`, {});
		v = await current(job.id);
		expect(
			(
				await push(w.as.lead, 'lead-phone', [
					op('job', 'patch', job.id, { status: 'closed' }, v.version)
				])
			)[0].status
		).toBe('applied');
		expect((await current(job.id)).status).toBe('closed');
	});

	it('refuses while a clash on the job or one of its tests is open, and settling the clash to “Closed” closes it', async () => {
		const job = await jobFor('technician', 'repaired');
		const testId = await recordTest(w.as.technician, job.id, 0.6);
		// Two phones change the test's notes from the same version: a clash on the job's test.
		const [t] = await rows('SELECT version FROM tests WHERE id = ?', testId);
		expect(
			(
				await push(w.as.technician, 'phone-a', [
					op('test', 'patch', testId, { notes: 'Boot torn' }, Number(t.version))
				])
			)[0].status
		).toBe('applied');
		const [clash] = await push(w.as.lead, 'phone-b', [
			op('test', 'patch', testId, { notes: 'Boot fine' }, Number(t.version))
		]);
		expect(clash.status).toBe('conflict');
		const sentence =
			'The job cannot be closed yet: one clash on it is still open in the clash inbox.';
		let v = await current(job.id);
		expect(
			(
				await expectError(
					await statusApi(w.as.technician, { id: job.id, version: v.version }, 'closed'),
					403,
					'forbidden'
				)
			).message
		).toBe(sentence);
		expect(
			(
				await push(w.as.technician, 'phone-a', [
					op('job', 'patch', job.id, { status: 'closed' }, v.version)
				])
			)[0]
		).toMatchObject({ message: sentence });
		expect(
			(await w.as.lead.json('POST', `/api/conflicts/${clash.conflictId}`, { pick: 'server' }))
				.status
		).toBe(200);

		// A clash on the job's status itself, settled by picking "Closed": the clash being
		// settled does not stand in the way.
		v = await current(job.id);
		await push(w.as.technician, 'phone-a', [
			op('job', 'patch', job.id, { status: 'awaiting_parts' }, v.version)
		]);
		const [statusClash] = await push(w.as.lead, 'phone-b', [
			op('job', 'patch', job.id, { status: 'closed' }, v.version)
		]);
		expect(statusClash.status).toBe('conflict');
		expect((await current(job.id)).status).toBe('awaiting_parts');
		const settled = await w.as.lead.json('POST', `/api/conflicts/${statusClash.conflictId}`, {
			pick: 'value',
			value: 'closed'
		});
		expect(settled.status, await settled.clone().text()).toBe(200);
		expect((await current(job.id)).status).toBe('closed');
		expect(
			(await rows('SELECT status FROM conflicts WHERE id = ?', statusClash.conflictId))[0].status
		).toBe('settled');
	});
});
