import { error } from '@sveltejs/kit';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { readCaught } from '$lib/server/mail/caught';

/** An attachment of a caught message, as it was sent. */
export async function GET(event) {
	guardPage(event, LEADS);
	const m = await readCaught(event.params.file);
	const a = m?.attachments[Number(event.params.index)];
	if (!a) error(404, 'No such attachment');
	return new Response(new Uint8Array(a.content), {
		headers: {
			'content-type': a.contentType === 'application/pdf' ? 'application/pdf' : 'application/octet-stream',
			'content-disposition': `inline; filename="${a.filename.replace(/["\\\r\n]/g, '')}"`,
			'cache-control': 'private, no-store'
		}
	});
}
