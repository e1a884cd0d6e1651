/**
 * The rulebook on the phone: an apprentice is refused spark and swap tests on a hybrid before
 * anything is saved, is offered no status move the role may not make, and finds a change the
 * server refused under "Needs attention", in the server's words, with the choice to discard
 * it — while the rest of the outbox goes through. The job on the hybrid is made for this test
 * (invented) and removed again at the end.
 */
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { openPhone, shot, signInAs } from './browser';

const base = inject('baseURL');
const HYBRID_VAN = '019a0000-0000-7000-8000-000000000203'; // the demo's hybrid
let phone: Awaited<ReturnType<typeof openPhone>>;
let services: {
	jobs: typeof import('../../src/lib/server/services/jobs').jobs;
	closeDb: () => Promise<void>;
};
let lead: import('../../src/lib/server/auth/types').Actor;
let jobId: string;

beforeAll(async () => {
	Object.assign(process.env, inject('dbEnv'));
	const { jobs } = await import('../../src/lib/server/services/jobs');
	const { closeDb, db } = await import('../../src/lib/server/db');
	const { User } = await import('../../src/lib/server/db/models');
	db(); // the models are set up with the connection
	services = { jobs, closeDb };
	const [l, apprentice] = await Promise.all([
		User.findOne({ where: { email: 'lead@tallowbridge.example' } }),
		User.findOne({ where: { email: 'apprentice@tallowbridge.example' } })
	]);
	lead = { userId: l!.id, workshopId: l!.workshopId, role: 'lead', deviceId: 'e2e' };
	const job = await jobs.create(lead, {
		complaint: 'Hesitation on the hybrid under load',
		vehicleId: HYBRID_VAN,
		assigneeId: apprentice!.id
	});
	jobId = job.id as string;
	phone = await openPhone();
});
afterEach(() => {
	expect(phone.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await phone?.close();
	if (jobId) {
		const current = await services.jobs.read(lead, jobId);
		await services.jobs.remove(lead, jobId, current.version as number);
	}
	await services?.closeDb();
});

describe('the rulebook on the phone', () => {
	it('refuses an apprentice a spark or swap test on a hybrid before anything is saved', async () => {
		const { page } = phone;
		await signInAs(phone, base, 'apprentice@tallowbridge.example');
		await page.getByTestId('job-list').getByText('Hesitation on the hybrid').waitFor();
		for (const kind of ['spark', 'swap']) {
			await page.goto(`${base}/field/job/${jobId}/${kind}`);
			await expect.poll(() => page.getByTestId('refusal').textContent()).toContain('Apprentices do not work on hybrid');
			expect(await page.getByRole('button', { name: `Save the ${kind} test` }).isDisabled()).toBe(true);
			await shot(page, `rulebook-1-${kind}-refused`);
		}
		await page.goto(`${base}/field/sync`);
		await expect.poll(() => page.getByText('Everything on this phone has been sent').count()).toBe(1);
	});

	it('offers an apprentice no move to closed', async () => {
		const { page } = phone;
		await page.goto(`${base}/field/job/${jobId}`);
		await page.getByTestId('complaint').waitFor();
		expect(await page.locator('#status option[value="closed"]').isDisabled()).toBe(true);
		expect(await page.locator('#status option[value="testing"]').isDisabled()).toBe(false);
	});

	it('lists a refused change under Needs attention with the server’s words, and discards it', async () => {
		const { page, context } = phone;
		await context.setOffline(true);
		await page.getByLabel('New note').fill('Inverter coolant low');
		await page.getByRole('button', { name: 'Add note' }).click();
		await page.getByText('Note saved on this phone').waitFor();
		// Meanwhile the lead gives the job to the technician: the apprentice's note is refused.
		const { User } = await import('../../src/lib/server/db/models');
		const tech = await User.findOne({ where: { email: 'tech@tallowbridge.example' } });
		const current = await services.jobs.read(lead, jobId);
		await services.jobs.update(lead, jobId, current.version as number, { assigneeId: tech!.id });
		await context.setOffline(false);
		await page.goto(`${base}/field/sync`);
		await page.getByRole('button', { name: 'Sync now' }).click();
		const issues = page.getByTestId('issues');
		await expect.poll(() => issues.textContent(), { timeout: 20_000 }).toContain('You can change only the jobs assigned to you');
		expect(await page.getByText('Everything on this phone has been sent').count()).toBe(1);
		await shot(page, 'rulebook-2-needs-attention');
		await issues.getByRole('button', { name: 'Discard this change' }).click();
		await page.getByText('Nothing was refused.').waitFor();
		await shot(page, 'rulebook-3-discarded');
	});
});
