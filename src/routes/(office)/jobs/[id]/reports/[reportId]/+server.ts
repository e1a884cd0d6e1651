import { error } from '@sveltejs/kit';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { keptPdf } from '$lib/server/reports/service';
import { readOne } from '$lib/server/services/jobs';

/** The exact PDF a report went out with, for anyone who may open the job. */
export async function GET(event) {
	const actor = actorOf(guardPage(event));
	try {
		await readOne(actor, event.params.id);
		const { pdf, jobNumber } = await keptPdf(actor, event.params.id, event.params.reportId);
		return new Response(new Uint8Array(pdf), {
			headers: {
				'content-type': 'application/pdf',
				'content-disposition': `inline; filename="Vehicle report, job ${jobNumber}.pdf"`,
				'cache-control': 'private, no-store'
			}
		});
	} catch (e) {
		if (e instanceof NotFoundError) error(404, 'No such report on this job');
		throw e;
	}
}
