/**
 * The rulebook's pure half (`src/lib/rules.ts`), which the phone calls before it saves and
 * the server calls in every channel. The rules are the workshop's own (DESIGN §6); the high-
 * voltage one follows common practice: only trained, authorised staff work on hybrid and
 * electric vehicles.
 */
import { describe, expect, it } from 'vitest';
import { JOB_STATUSES } from '../../src/lib/schemas/job';
import { refuseTest } from '../../src/lib/flow/decisions';
import { ROLES } from '../../src/lib/roles';
import {
	refuseAssignee,
	refuseHybridWork,
	refuseSignOff,
	refuseStatusChange,
	seesJob
} from '../../src/lib/rules';

const who = (role: (typeof ROLES)[number]) => ({ role, userId: `${role}-id` });

describe('the shared rules', () => {
	it('refuse an apprentice any test on a hybrid or electric vehicle, and no one else', () => {
		for (const role of ROLES) {
			expect(refuseHybridWork(who(role), false)).toBeNull();
			const why = refuseHybridWork(who(role), true);
			if (role === 'apprentice') expect(why).toMatch(/Apprentices do not work on hybrid/);
			else expect(why).toBeNull();
		}
		// The coil test's start screen says the same words.
		expect(refuseTest({ role: 'apprentice', hybrid: true, cautions: [] })).toBe(
			refuseHybridWork(who('apprentice'), true)
		);
	});

	it('let no apprentice close a job and only leads and owners reopen one', () => {
		let checked = 0;
		for (const role of ROLES)
			for (const from of JOB_STATUSES)
				for (const to of JOB_STATUSES) {
					const why = refuseStatusChange(who(role), from, to);
					const lead = role === 'lead' || role === 'owner';
					const refused =
						from !== to && ((from === 'closed' && !lead) || (to === 'closed' && role === 'apprentice'));
					expect(why !== null, `${role}: ${from} → ${to}`).toBe(refused);
					checked++;
				}
		expect(checked).toBe(4 * 8 * 8);
		expect(refuseStatusChange(who('apprentice'), 'testing', 'closed')).toBe(
			'Only a technician or a workshop lead can close a job'
		);
	});

	it('let technicians and apprentices assign a job only to themselves', () => {
		expect(refuseAssignee(who('technician'), 'technician-id')).toBeNull();
		expect(refuseAssignee(who('technician'), 'apprentice-id')).toMatch(/Only a workshop lead/);
		expect(refuseAssignee(who('apprentice'), null)).toMatch(/Only a workshop lead/);
		expect(refuseAssignee(who('lead'), 'apprentice-id')).toBeNull();
		expect(refuseAssignee(who('owner'), null)).toBeNull();
	});

	it('show a technician only their own jobs and a lead every job', () => {
		expect(seesJob(who('technician'), { assigneeId: 'technician-id' })).toBe(true);
		expect(seesJob(who('technician'), { assigneeId: 'apprentice-id' })).toBe(false);
		expect(seesJob(who('apprentice'), { assigneeId: null })).toBe(false);
		expect(seesJob(who('lead'), { assigneeId: 'apprentice-id' })).toBe(true);
	});

	it('leave sign-offs to leads and owners', () => {
		expect(ROLES.filter((r) => refuseSignOff(who(r)) === null)).toEqual(['lead', 'owner']);
	});
});
