import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { NEXT_STATUS, readFaultCodeForm, readJobForm, type CodeList } from '$lib/schemas/job';
import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { baseVersionOf, failFrom, valuesOf } from '$lib/server/forms';
import * as jobs from '$lib/server/services/jobs';
import { mailConfig } from '$lib/server/mail/config';
import { mayChangeReportSettings, mayReadCaughtMail, maySendReport, mayWithdrawReport } from '$lib/server/reports/rules';
import { reportsOfJob, withdrawReport } from '$lib/server/reports/service';
import { readReportSettings } from '$lib/server/reports/settings';
import { jobCircuitTests, jobTests } from '$lib/server/services/test-display';
import { loadJobFacts } from '$lib/server/services/job-facts';
import { decideTest } from '$lib/server/services/signoffs';
import { refuseRetestedOk, refuseClose } from '$lib/rules';
import { isLead } from '$lib/roles';
import { jobFormOptions } from '../../options.server';
import { jobMoney } from '$lib/server/quotes/job-money';
import { jobPhotos, markPhoto } from '$lib/server/photos/service';
import { User } from '$lib/server/db/models';

const listOf = (fd: FormData): CodeList => (fd.get('list') === 'after' ? 'after' : 'before');

export async function load(event) {
	const user = guardPage(event);
	const actor = actorOf(user);
	const id = event.params.id;
	if (!z.uuid().safeParse(id).success) error(404, 'No such job');
	const job = await jobs.readOne(actor, id).catch((e) => {
		if (e instanceof NotFoundError) error(404, 'No such job, or it is not assigned to you');
		throw e;
	});
	const [history, tests, facts, photos, people, circuits] = await Promise.all([
		jobs.statusHistory(actor, id),
		jobTests(actor, id),
		loadJobFacts(actor, id),
		jobPhotos(actor, id),
		User.findAll({ where: { workshopId: actor.workshopId }, attributes: ['id', 'name'] }),
		jobCircuitTests(actor, id)
	]);
	return {
		title: `Job ${job.number}`,
		job,
		history,
		tests,
		photos,
		people: Object.fromEntries(people.map((u) => [u.id, u.name])),
		circuits,
		next: NEXT_STATUS[job.status],
		/** What the work must still show before these moves (null: nothing missing). */
		missing: { retested_ok: refuseRetestedOk(facts), closed: refuseClose(facts) },
		signsOff: isLead(actor),
		reports: {
			list: await reportsOfJob(actor, id),
			maySend: maySendReport(actor, job, await readReportSettings(actor.workshopId)),
			mayWithdraw: mayWithdrawReport(actor),
			settings: mayChangeReportSettings(actor),
			caughtMail: mayReadCaughtMail(actor) && mailConfig().fakeDir !== null
		},
		money: await jobMoney(actor, id),
		...(await jobFormOptions(actor, job))
	};
}

/** Each action: guard → parse → service → the answer the form reads (`action` names the form). */
export const actions = {
	update: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			await jobs.editJob(actor, event.params.id, baseVersionOf(fd), readJobForm(fd));
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'update');
		}
		return { action: 'update', saved: true };
	},
	status: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		const input = { status: fd.get('status'), baseVersion: baseVersionOf(fd) };
		try {
			await jobs.changeStatus(actor, event.params.id, input);
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'status');
		}
		return { action: 'status', saved: true };
	},
	addCode: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		const list = listOf(fd);
		try {
			await jobs.addFaultCode(actor, event.params.id, list, readFaultCodeForm(fd));
		} catch (e) {
			return failFrom(e, valuesOf(fd), `addCode-${list}`);
		}
		return { action: `addCode-${list}`, saved: true };
	},
	removeCode: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		const list = listOf(fd);
		try {
			const index = Number(fd.get('index'));
			await jobs.removeFaultCode(actor, event.params.id, list, index, String(fd.get('code')));
		} catch (e) {
			return failFrom(e, valuesOf(fd), `addCode-${list}`);
		}
		return { action: `addCode-${list}`, saved: true };
	},
	signoff: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		const testId = String(fd.get('testId') ?? '');
		const action = `signoff-${testId}`;
		try {
			if (!z.uuid().safeParse(testId).success) throw new NotFoundError('Test');
			await decideTest(actor, testId, { decision: fd.get('decision') ?? undefined, note: fd.get('note') ?? undefined });
		} catch (e) {
			return failFrom(e, valuesOf(fd), action);
		}
		return { action, saved: true };
	},
	photoMark: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			await markPhoto(actor, String(fd.get('photoId') ?? ''), { mark: fd.get('mark') ?? undefined });
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'photoMark');
		}
		return { action: 'photoMark', saved: true };
	},
	withdrawReport: async (event) => {
		const actor = actorOf(guardPage(event));
		const fd = await event.request.formData();
		try {
			await withdrawReport(actor, event.params.id, String(fd.get('reportId') ?? ''));
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'withdrawReport');
		}
		return { action: 'withdrawReport', saved: true };
	}
};
