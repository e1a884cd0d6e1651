/** Inputs of the customer report: the workshop's report settings and a report to send. */
import { z } from 'zod';
import { PAPERS, RECOMMENDATION_GRADES } from '../report/types';
import { formBool, formNumber, formText, optionalText, uuidRef } from './common';

export const reportSettingsInput = z.object({
	address: optionalText(300),
	phone: optionalText(40),
	email: z
		.string()
		.trim()
		.max(254)
		.transform((v) => (v === '' ? null : v.toLowerCase()))
		.pipe(z.email('Enter an e-mail address, or leave it empty').nullable()),
	paper: z.enum(PAPERS, { error: 'Choose A4 or US Letter' }),
	linkDays: z
		.number({ error: 'A number of days' })
		.int('A whole number of days')
		.min(1, 'At least 1 day')
		.max(365, 'At most 365 days'),
	techniciansSend: z.boolean()
});
export type ReportSettingsInput = z.output<typeof reportSettingsInput>;

export function readReportSettingsForm(fd: FormData) {
	return {
		address: formText(fd, 'address'),
		phone: formText(fd, 'phone'),
		email: formText(fd, 'email'),
		paper: formText(fd, 'paper'),
		linkDays: formNumber(fd, 'linkDays'),
		techniciansSend: formBool(fd, 'techniciansSend')
	};
}

/** How many recommendation rows the send form offers. */
export const RECOMMENDATION_ROWS = 3;

export const recommendation = z.object({
	grade: z.enum(RECOMMENDATION_GRADES, { error: 'Choose how soon' }),
	text: z.string().trim().max(300, 'At most 300 characters')
});

/** What the lead adds to the job's facts: what was done and what is recommended. */
export const reportNotes = z.object({
	workDone: optionalText(2000),
	recommendations: z.array(recommendation).max(RECOMMENDATION_ROWS).default([])
});
export type ReportNotes = z.output<typeof reportNotes>;

export const sendReport = reportNotes.extend({
	/** Made when the preview is shown: sending the same form twice makes one report. */
	sendKey: uuidRef,
	channel: z.enum(['email', 'link'], { error: 'Choose e-mail or a link' }),
	paper: z.enum(PAPERS, { error: 'Choose A4 or US Letter' }),
	/** The digest of the report as previewed: a job that changed since is shown again first. */
	digest: z.string().regex(/^[0-9a-f]{64}$/, 'Preview the report first')
});
export type SendReportInput = z.output<typeof sendReport>;

/** The notes typed in the send form (empty recommendation rows are left out). */
export function readReportNotesForm(fd: FormData) {
	const recommendations = [];
	for (let i = 0; i < RECOMMENDATION_ROWS; i++) {
		const text = formText(fd, `rec${i}`);
		if (text.trim()) recommendations.push({ grade: formText(fd, `grade${i}`), text });
	}
	return { workDone: formText(fd, 'workDone'), recommendations };
}

export function readSendReportForm(fd: FormData) {
	return {
		...readReportNotesForm(fd),
		sendKey: formText(fd, 'sendKey'),
		channel: formText(fd, 'channel'),
		paper: formText(fd, 'paper'),
		digest: formText(fd, 'digest')
	};
}
