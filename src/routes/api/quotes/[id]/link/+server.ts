/**
 * A link for the customer to answer a quote, with its QR code (SVG) for the technician's
 * phone to show; `{ email: true }` also e-mails it through the outbox. Whoever may work on
 * the job (`makeQuoteLink`). A fresh link retires the older unanswered ones.
 */
import QRCode from 'qrcode';
import { z } from 'zod';
import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { mailConfig } from '$lib/server/mail/config';
import { makeQuoteLink, quoteLinkState } from '$lib/server/quotes/links';

/**
 * GET → { latest: { expiresAt, expired, answered } | null }: the quote's latest link, so the
 * phone can say plainly that it ran out and offer a fresh one.
 */
export const GET = api(async (event, user) => ({ latest: await quoteLinkState(actorOf(user), event.params.id ?? '') }));

export const POST = api(async (event, user) => {
	if (!z.uuid().safeParse(event.params.id).success) throw new NotFoundError('Quote');
	const body = (await readJson(event.request)) as { email?: unknown } | null;
	const made = await makeQuoteLink(actorOf(user), event.params.id!, mailConfig().publicUrl ?? event.url.origin, { email: body?.email === true });
	return {
		url: made.url,
		expiresAt: made.expiresAt,
		emailed: made.emailed,
		emailBlock: made.emailBlock,
		qr: await QRCode.toString(made.url, { type: 'svg', margin: 2, errorCorrectionLevel: 'M' })
	};
});
