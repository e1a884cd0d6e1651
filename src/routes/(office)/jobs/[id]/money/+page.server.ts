import { error } from '@sveltejs/kit';
import QRCode from 'qrcode';
import { z } from 'zod';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { failFrom, valuesOf } from '$lib/server/forms';
import { mailConfig } from '$lib/server/mail/config';
import { askCardPayment, recordManualPayment, refundPayment } from '$lib/server/payments/service';
import { jobMoney } from '$lib/server/quotes/job-money';
import { makeQuoteLink } from '$lib/server/quotes/links';
import * as jobs from '$lib/server/services/jobs';
import { quotes } from '$lib/server/services/quotes';
import { isLead } from '$lib/roles';
import { formatMoney } from '$lib/money';

/** A QR code of an address as SVG markup (drawn by the `qrcode` package, no script, no style). */
const qrOf = (url: string) => QRCode.toString(url, { type: 'svg', margin: 2, errorCorrectionLevel: 'M' });

export async function load(event) {
	const actor = actorOf(guardPage(event));
	const id = event.params.id;
	if (!z.uuid().safeParse(id).success) error(404, 'No such job');
	const job = await jobs.readOne(actor, id).catch((e) => {
		if (e instanceof NotFoundError) error(404, 'No such job, or it is not assigned to you');
		throw e;
	});
	return { title: `Job ${job.number}: quote and payments`, job, money: await jobMoney(actor, id), refunds: isLead(actor) };
}

const base = (url: URL) => mailConfig().publicUrl ?? url.origin;

export const actions = {
	link: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			const made = await makeQuoteLink(actor, String(fd.get('quoteId') ?? ''), base(event.url), { email: fd.get('email') === 'on' });
			return { action: 'link', url: made.url, qr: await qrOf(made.url), emailed: made.emailed, emailBlock: made.emailBlock };
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'link');
		}
	},
	verbal: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			if (!z.uuid().safeParse(String(fd.get('quoteId') ?? '')).success) throw new NotFoundError('Quote');
			await quotes.update(actor, String(fd.get('quoteId') ?? ''), Number(fd.get('baseVersion')), {
				verbalDecision: fd.get('decision') === 'declined' ? 'declined' : 'approved',
				verbalName: String(fd.get('verbalName') ?? ''),
				verbalHow: String(fd.get('verbalHow') ?? '') || null
			});
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'verbal');
		}
		return { action: 'verbal', saved: true };
	},
	card: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			const back = `${base(event.url)}/jobs/${event.params.id}/money`;
			const p = await askCardPayment(actor, event.params.id, fd.get('purpose'), { successUrl: back, cancelUrl: back });
			return { action: 'card', url: p.url, qr: await qrOf(p.url) };
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'card');
		}
	},
	manual: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			await recordManualPayment(actor, event.params.id, { purpose: fd.get('purpose'), method: fd.get('method'), note: fd.get('note') ?? '' });
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'manual');
		}
		return { action: 'manual', saved: true };
	},
	refund: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			const made = await refundPayment(actor, String(fd.get('paymentId') ?? ''), { amount: String(fd.get('amount') ?? ''), reason: String(fd.get('reason') ?? '') });
			return { action: 'refund', saved: true, paymentId: String(fd.get('paymentId')), refunded: formatMoney(made.amountMinor, made.currency) };
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'refund');
		}
	}
};
