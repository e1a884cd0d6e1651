/** Turn the services' not-found into the page's 404 (another workshop's record included). */
import { error } from '@sveltejs/kit';
import { NotFoundError } from '$lib/server/errors';
import { z } from 'zod';

export async function orNotFound<T>(id: string, fn: () => Promise<T>): Promise<T> {
	if (!z.uuid().safeParse(id).success) error(404, { message: 'No such record in the library.' });
	try {
		return await fn();
	} catch (e) {
		if (e instanceof NotFoundError) error(404, { message: 'No such record in the library.' });
		throw e;
	}
}
