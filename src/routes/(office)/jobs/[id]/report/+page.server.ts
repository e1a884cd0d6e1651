import { error, fail } from '@sveltejs/kit';
import { v7 as uuidv7 } from 'uuid';
import { z } from 'zod';
import { readReportNotesForm, readSendReportForm } from '$lib/schemas/report';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { AppError } from '$lib/server/errors';
import { failFrom, valuesOf } from '$lib/server/forms';
import { mailConfig } from '$lib/server/mail/config';
import { previewReport, ReportChangedError, sendReport } from '$lib/server/reports/service';

/** 404 and 403 from the service as the page's error. */
function pageError(e: unknown): never {
	if (e instanceof AppError && (e.status === 403 || e.status === 404)) error(e.status, e.message);
	throw e;
}

export async function load(event) {
	const actor = actorOf(guardPage(event));
	if (!z.uuid().safeParse(event.params.id).success) error(404, 'No such job');
	const preview = await previewReport(actor, event.params.id).catch(pageError);
	return {
		title: `Report for job ${preview.doc.jobNumber}`,
		jobId: event.params.id,
		preview,
		sendKey: uuidv7(),
		mailReady: mailConfig().smtp !== null
	};
}

/** Each action: guard → parse → service → the answer the page reads. */
export const actions = {
	preview: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			const preview = await previewReport(actor, event.params.id, readReportNotesForm(fd));
			return { action: 'preview', preview, values: valuesOf(fd) };
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'preview');
		}
	},
	send: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		const base = mailConfig().publicUrl ?? event.url.origin;
		try {
			const sent = await sendReport(actor, event.params.id, readSendReportForm(fd), base);
			return { action: 'send', sent };
		} catch (e) {
			if (e instanceof ReportChangedError)
				return fail(409, { action: 'send', message: e.message, preview: e.preview, values: valuesOf(fd) });
			return failFrom(e, valuesOf(fd), 'send');
		}
	}
};
