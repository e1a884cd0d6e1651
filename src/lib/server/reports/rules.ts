/**
 * Who may do what with customer reports. Small pure rules, one per question, kept apart so
 * they can join the workshop's one rulebook as they are.
 */
import { isLead, type Role } from '../../roles';

type Who = { userId: string; role: Role };

/**
 * Send a report on a job: leads and owners on any job; technicians on the jobs assigned to
 * them, when the workshop's report settings allow it; apprentices never.
 */
export function maySendReport(who: Who, job: { assigneeId: string | null }, settings: { techniciansSend: boolean }): boolean {
	if (isLead(who)) return true;
	return who.role === 'technician' && settings.techniciansSend && job.assigneeId === who.userId;
}

/** Withdraw a report's link (and stop its e-mail if it has not left): leads and owners. */
export const mayWithdrawReport = (who: Who) => isLead(who);

/** Change the workshop's report settings: leads and owners. */
export const mayChangeReportSettings = (who: Who) => isLead(who);

/** See the messages the local fake mail server caught: leads and owners. */
export const mayReadCaughtMail = (who: Who) => isLead(who);
