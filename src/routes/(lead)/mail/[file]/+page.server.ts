import { error } from '@sveltejs/kit';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { readCaught } from '$lib/server/mail/caught';

export async function load(event) {
	guardPage(event, LEADS);
	const m = await readCaught(event.params.file);
	if (!m) error(404, 'No such caught message');
	const { attachments, ...rest } = m;
	return { message: { ...rest, attachments: attachments.map(({ content: _c, ...a }) => a) } };
}
