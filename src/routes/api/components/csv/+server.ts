import { api } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import { ValidationError } from '$lib/server/errors';
import { exportLibrary, importLibrary } from '$lib/server/services/spec-csv';

/**
 * GET /api/components/csv?q=&kind=&sheets=&delimiter=semicolon → the library as text/csv
 * (`,` and decimal points; `delimiter=semicolon` gives `;` and decimal commas).
 */
export const GET = api(async ({ url }, user) => {
	const { delimiter, ...query } = queryObject(url.searchParams);
	const text = await exportLibrary(actorOf(user), query, delimiter === 'semicolon' ? ';' : ',');
	const day = new Date().toISOString().slice(0, 10);
	return new Response(text, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="fieldbench-spec-library-${day}.csv"`
		}
	});
});

/** POST /api/components/csv (body: text/csv) → { imported } or 400 with `lines` (nothing imported) */
export const POST = api(
	async ({ request }, user) => {
		const type = request.headers.get('content-type') ?? '';
		if (!/^text\/(csv|plain)\b/i.test(type))
			throw new ValidationError({ _: 'Send the file as text/csv' }, 'Send the file as text/csv');
		return { imported: await importLibrary(actorOf(user), await request.text()) };
	},
	{ roles: LEADS }
);
