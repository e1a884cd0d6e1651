/**
 * The workshop's time zone through the built app: a lead changes it on the team page, and the
 * job page and the report show the same moment on the workshop's clock. Expected clock times:
 * IANA tzdb via Intl (Europe/London keeps BST, UTC+1, from 29 March to 25 October 2026, Rule EU).
 */
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { Workshop } from '../../src/lib/server/db/models';
import { gatherFacts, jobWithParties } from '../../src/lib/server/reports/facts';
import { readReportSettings } from '../../src/lib/server/reports/settings';
import { jobs } from '../../src/lib/server/services/jobs';
import { saveTimeZone } from '../../src/lib/server/services/workshops';
import { deskWorkshop, meter } from '../helpers/desk';
import { makeWorkshop } from '../helpers/fixtures';
import type { Client } from '../helpers/http';
import { signedIn } from '../helpers/records';
import { create, push } from '../helpers/sync';

let ws: Awaited<ReturnType<typeof makeWorkshop>>;
let lead: Client;
let tech: Client;
let jobId: string;

const zoneOf = async () => (await Workshop.findByPk(ws.workshop.id))!.timeZone;
const setZone = (who: Client, timeZone: string) => who.form('/team?/timeZone', { timeZone });

beforeAll(async () => {
	ws = await makeWorkshop('Clock');
	[lead, tech] = await Promise.all([signedIn(ws, 'lead'), signedIn(ws, 'technician')]);
	const job = (await jobs.create(ws.users.lead.actor, {
		complaint: 'Slow crank in the mornings'
	})) as { id: string };
	jobId = job.id;
	// The job's history says it was opened at 14:05 UTC on 1 July 2026.
	await db().query(
		`UPDATE audit_log SET at = '2026-07-01 14:05:00.000' WHERE workshop_id = ? AND entity = 'job' AND entity_id = ?`,
		{
			replacements: [ws.workshop.id, jobId],
			type: QueryTypes.UPDATE
		}
	);
});

describe('the workshop time zone', () => {
	it("moves the job page's times when a lead changes the zone", async () => {
		expect((await setZone(lead, 'UTC')).status).toBe(200);
		const before = await (await lead.get(`/jobs/${jobId}`, 'text/html')).text();
		expect(before).toContain('1 Jul 2026, 14:05 UTC');

		const r = await setZone(lead, 'Europe/London');
		expect(r.status).toBe(200);
		expect(await r.text()).toContain('Times now show in Europe/London');
		expect(await zoneOf()).toBe('Europe/London');
		const after = await (await lead.get(`/jobs/${jobId}`, 'text/html')).text();
		expect(after).toContain('1 Jul 2026, 15:05 BST');
		expect(after).not.toContain('14:05 UTC');
	});

	it("says on the report which clock it follows, and dates it by the workshop's day", async () => {
		await setZone(lead, 'Europe/London');
		const page = await (await lead.get(`/jobs/${jobId}/report`, 'text/html')).text();
		expect(page).toContain(
			'Dates and times in this report are the workshop’s local time (Europe/London).'
		);

		// 23:30 UTC on 14 August 2026 is 00:30 BST on the 15th in London (IANA tzdb via Intl).
		const late = new Date('2026-08-14T23:30:00Z');
		const actor = ws.users.lead.actor;
		const parties = await jobWithParties(actor, jobId);
		const notes = { workDone: null, recommendations: [] };
		const london = await gatherFacts(
			actor,
			parties,
			await readReportSettings(ws.workshop.id),
			notes,
			late
		);
		expect(london.facts.date).toBe('2026-08-15');
		await setZone(lead, 'UTC');
		const utc = await gatherFacts(
			actor,
			parties,
			await readReportSettings(ws.workshop.id),
			notes,
			late
		);
		expect(utc.facts.date).toBe('2026-08-14');
	});

	it('refuses a made-up zone with a clear error and keeps the one there was', async () => {
		await setZone(lead, 'Europe/London');
		const r = await setZone(lead, 'Atlantis/Harbour');
		expect(r.status).toBe(400);
		expect(await r.text()).toContain('Choose a time zone from the list, like Europe/London');
		expect(await zoneOf()).toBe('Europe/London');
	});

	it('is for leads and owners only', async () => {
		const r = await setZone(tech, 'Asia/Kolkata');
		expect(r.status).toBe(403);
		expect(await zoneOf()).not.toBe('Asia/Kolkata');
	});
});

describe("the overview's days", () => {
	it("count a test by the day on the workshop's clock, its lead zero too", async () => {
		const w = await deskWorkshop(inject('baseURL'), 'Clock overview');
		const lead = w.users.lead.actor;
		const jobId = (
			await jobs.create(lead, {
				complaint: 'Late-night misfire',
				assigneeId: w.users.technician.id
			})
		).id as string;
		const t = create('test', {
			jobId,
			componentId: w.componentId,
			sheetId: w.sheetId,
			partNumber: 'TZ-LATE-1',
			position: '1',
			meter: meter('Night Meter', 0.1),
			temperature: { mode: 'measured', tempC: 20 }
		});
		expect(
			(await push(w.as.technician, 'tz-phone', [t])).every((r) => r.status === 'applied')
		).toBe(true);
		// Reached the workshop at 23:30 UTC on 14 August 2026: 00:30 BST on the 15th in London (IANA tzdb via Intl).
		await db().query(`UPDATE tests SET created_at = '2026-08-14 23:30:00.000' WHERE id = ?`, {
			replacements: [t.entityId],
			type: QueryTypes.UPDATE
		});
		const day = async (d: string) =>
			(await w.as.lead.get(`/api/overview?from=${d}&to=${d}`)).json();
		const parts = (o: { parts: { partNumber: string }[] }) => o.parts.map((p) => p.partNumber);

		await saveTimeZone(lead, { timeZone: 'Europe/London' });
		const london = await day('2026-08-15');
		expect(parts(london)).toEqual(['TZ-LATE-1']);
		expect(london.leadZero[0].points[0].period).toBe('2026-08-15');
		expect(parts(await day('2026-08-14'))).toEqual([]);
		// A year spans both changes of 2026 (Rule EU), in weeks from Monday on London's clock:
		// Saturday 15 August is in the week of Monday 10 August (Friday 14th would be too, so
		// the range's own day is what the two lines above tell apart).
		const year = await (await w.as.lead.get('/api/overview?from=2026-01-01&to=2026-12-31')).json();
		expect(year.bucket).toBe('week');
		expect(year.leadZero[0].points[0].period).toBe('2026-08-10');

		await saveTimeZone(lead, { timeZone: 'UTC' });
		const utc = await day('2026-08-14');
		expect(parts(utc)).toEqual(['TZ-LATE-1']);
		expect(utc.leadZero[0].points[0].period).toBe('2026-08-14');
		expect(parts(await day('2026-08-15'))).toEqual([]);
	});
});
