import { PAPERS, type Paper } from '$lib/report/types';
import { printPhotoLoader, renderReportPdf } from '$lib/server/reports/pdf';
import { printPhoto } from '$lib/server/photos/service';
import { openReport } from '$lib/server/reports/service';
import { goneMessage } from '../gone';

/**
 * The report's PDF: the exact file that was sent, or the same words drawn on the other
 * paper size when `?paper=` asks for it (photos at print size from the originals still kept). 410 with a kind sentence once withdrawn or expired.
 */
export async function GET({ params, url }) {
	const r = await openReport(params.token);
	if (r.state !== 'open') {
		const status = r.state === 'unknown' ? 404 : 410;
		const text = goneMessage(r.state, r.state === 'unknown' ? undefined : r.workshopName);
		return new Response(text, { status, headers: { 'content-type': 'text/plain; charset=utf-8', 'cache-control': 'no-store' } });
	}
	const asked = url.searchParams.get('paper');
	const paper = (PAPERS as readonly string[]).includes(asked ?? '') ? (asked as Paper) : r.paper;
	const pdf =
		paper === r.paper
			? r.pdf
			: await renderReportPdf(r.doc, { paper, loadPhoto: printPhotoLoader(r.workshopId, printPhoto) });
	return new Response(new Uint8Array(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `inline; filename="Vehicle report, job ${r.doc.jobNumber}.pdf"`,
			'cache-control': 'no-store',
			'x-robots-tag': 'noindex, nofollow'
		}
	});
}
