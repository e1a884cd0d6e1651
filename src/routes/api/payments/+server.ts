/**
 * GET /api/payments?sort=&page=&pageSize= → { items, total, page, pageSize }: the
 * workshop's payments for the desk's list (leads and owners), sorted by any column
 * (`when`, `job`, `purpose`, `method`, `amount`, `refunded`, `state`, `by`; `-` for
 * descending; newest first unless asked).
 */
import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import { listPayments } from '$lib/server/payments/service';

export const GET = api(async ({ url }, user) => listPayments(actorOf(user), queryObject(url.searchParams)));
