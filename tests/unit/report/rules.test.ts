import { describe, expect, it } from 'vitest';
import { mayWithdrawReport, maySendReport } from '../../../src/lib/server/reports/rules';

const who = (role: 'apprentice' | 'technician' | 'lead' | 'owner') => ({ userId: `u-${role}`, role });
const mine = { assigneeId: 'u-technician' };
const theirs = { assigneeId: 'u-someone' };

describe('who sends customer reports', () => {
	it('leads and owners on any job, whatever the setting', () => {
		for (const r of ['lead', 'owner'] as const)
			for (const techniciansSend of [false, true]) expect(maySendReport(who(r), theirs, { techniciansSend })).toBe(true);
	});
	it('technicians only on their own jobs and only when the workshop allows it', () => {
		expect(maySendReport(who('technician'), mine, { techniciansSend: false })).toBe(false);
		expect(maySendReport(who('technician'), mine, { techniciansSend: true })).toBe(true);
		expect(maySendReport(who('technician'), theirs, { techniciansSend: true })).toBe(false);
	});
	it('never apprentices', () => {
		expect(maySendReport(who('apprentice'), { assigneeId: 'u-apprentice' }, { techniciansSend: true })).toBe(false);
	});
	it('withdrawing a link is for leads and owners', () => {
		expect(['apprentice', 'technician', 'lead', 'owner'].map((r) => mayWithdrawReport(who(r as 'lead')))).toEqual([false, false, true, true]);
	});
});
