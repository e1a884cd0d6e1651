import { error } from '@sveltejs/kit';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { caughtDir, listCaught } from '$lib/server/mail/caught';

/** The demo's caught e-mail (leads and owners, only while the local fake mail server is in use). */
export async function load(event) {
	guardPage(event, LEADS);
	if (!caughtDir()) error(404, 'E-mail goes to a real mail server here, so there is nothing caught to show.');
	return { messages: await listCaught() };
}
