import { overviewCsv } from '$lib/overview/csv';
import { queryObject } from '$lib/schemas/common';
import { overviewCsvQuery } from '$lib/schemas/overview';
import { api } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { ValidationError } from '$lib/server/errors';
import { parseOverviewQuery, readOverview } from '$lib/server/services/overview';

/**
 * GET /api/overview/csv?table=parts|meters|lead-zero|circuits|people&delimiter=semicolon&… (the
 * overview's query) → that table as text/csv: `,` and decimal points, or `;` and decimal commas.
 */
export const GET = api(
	async ({ url }, user) => {
		const { table, delimiter, ...rest } = queryObject(url.searchParams);
		const csv = overviewCsvQuery.safeParse({ table, delimiter });
		if (!csv.success) throw ValidationError.fromZod(csv.error);
		const overview = await readOverview(actorOf(user), parseOverviewQuery(rest));
		const text = overviewCsv(
			csv.data.table,
			overview,
			csv.data.delimiter === 'semicolon' ? ';' : ','
		);
		return new Response(text, {
			headers: {
				'content-type': 'text/csv; charset=utf-8',
				'content-disposition': `attachment; filename="fieldbench-${csv.data.table}-${overview.from}-to-${overview.to}.csv"`
			}
		});
	},
	{ roles: LEADS }
);
