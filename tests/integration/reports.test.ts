/**
 * Customer reports end to end through the built app: queued, sent once through this runner's
 * fake mail server, read back with mailparser (recipient, subject, plain text, the PDF with
 * its text extracted by pdftotext, the working link); a mail server outage; consent; expired
 * and withdrawn links; several senders at once.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { simpleParser, type ParsedMail } from 'mailparser';
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { startMailServer, stopMailServer } from '../../scripts/lib/mail';
import { db } from '../../src/lib/server/db';
import { mailConfig } from '../../src/lib/server/mail/config';
import { enqueueMail, messageIdOf } from '../../src/lib/server/mail/outbox';
import { runMailOnce } from '../../src/lib/server/mail/worker';
import { digestOf, previewReport } from '../../src/lib/server/reports/service';
import { saveReportSettings } from '../../src/lib/server/reports/settings';
import * as customers from '../../src/lib/server/services/customers';
import { components, sheets } from '../../src/lib/server/services/components';
import { jobs } from '../../src/lib/server/services/jobs';
import { vehicles } from '../../src/lib/server/services/vehicles';
import { makeWorkshop } from '../helpers/fixtures';
import type { Client } from '../helpers/http';
import { signedIn } from '../helpers/records';
import { create, push } from '../helpers/sync';

const mail = inject('mail');
const base = inject('baseURL');
type Ws = Awaited<ReturnType<typeof makeWorkshop>>;
let ws: Ws;
let lead: Client;
let tech: Client;
let consenting: string;
let refusing: string;
let vehicleId: string;
let componentId: string;
let sheetId: string;

/**
 * A pencil coil's windings: primary 0.36–0.55 Ω cold, secondary 8.8–14.6 kΩ cold — common
 * practice figures, no published source (the part and its sheet are invented for the test).
 */
const CHECKS = [
	{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false,
		bands: [{ fromC: null, toC: 50, min: 0.36, max: 0.55 }] },
	{ key: 'secondary', label: 'Secondary winding', quantity: 'resistance', from: '1', to: 'HT', condition: 'key_off', unit: 'kΩ', openOk: false,
		bands: [{ fromC: null, toC: 50, min: 8800, max: 14600 }] }
];
const METER = { ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }, { label: '20 kΩ', resolution: 10, pctOfReading: 0.5, counts: 2 }], leadResistance: 0, relativeMode: true };

/** A job with this customer, tested on cylinders 1–3 by the technician's phone; cylinder 3's primary reads 0.92 Ω. */
async function testedJob(customerId: string, complaint = 'Misfire at idle') {
	const l = ws.users.lead.actor;
	const job = await jobs.create(l, { complaint, customerId, vehicleId, assigneeId: ws.users.technician.id });
	const t = create('test', { jobId: job.id, componentId, sheetId, position: '1,2,3', meter: METER, temperature: { mode: 'measured', tempC: 20 } });
	const r = (position: string, checkKey: string, value: number, unit: string, rangeLabel: string) =>
		create('reading', { testId: t.entityId, checkKey, position, samples: [{ value, unit }], rangeLabel });
	const results = await push(tech, `phone-${uuidv7().slice(-6)}`, [
		t,
		r('1', 'primary', 0.48, 'Ω', '200 Ω'), r('1', 'secondary', 11.9, 'kΩ', '20 kΩ'),
		r('2', 'primary', 0.47, 'Ω', '200 Ω'), r('2', 'secondary', 12.2, 'kΩ', '20 kΩ'),
		r('3', 'primary', 0.92, 'Ω', '200 Ω'), r('3', 'secondary', 12.0, 'kΩ', '20 kΩ')
	]);
	expect(results.every((x) => x.status === 'applied'), JSON.stringify(results)).toBe(true);
	return { id: job.id as string, number: job.number as number };
}

/** Send the job's report as the lead would from the preview page; returns the HTTP answer and its page. */
async function send(c: Client, jobId: string, fields: Record<string, string> = {}) {
	const notes = { workDone: fields.workDone ?? '', recommendations: [] };
	const preview = await previewReport(ws.users.lead.actor, jobId, notes);
	const r = await c.form(`/jobs/${jobId}/report?/send`, {
		sendKey: uuidv7(),
		digest: digestOf(preview.doc),
		channel: 'email',
		paper: 'a4',
		...fields
	});
	return { status: r.status, html: await r.text(), preview };
}

const reportRows = (jobId: string) =>
	db().query<{ id: string; state: string | null; attempts: number | null; last_reply: string | null; link_secret: string | null }>(
		`SELECT r.id, o.state, o.attempts, o.last_reply, o.link_secret FROM reports r LEFT JOIN mail_outbox o ON o.report_id = r.id
		 WHERE r.job_id = ? ORDER BY r.created_at`,
		{ replacements: [jobId], type: QueryTypes.SELECT }
	);

async function until<T>(what: string, fn: () => Promise<T | null | undefined | false>, ms = 20_000): Promise<T> {
	const end = Date.now() + ms;
	for (;;) {
		const v = await fn();
		if (v) return v;
		if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
		await new Promise((r) => setTimeout(r, 150));
	}
}

/** The messages this runner's fake caught with this Message-ID. */
async function caught(messageId: string): Promise<ParsedMail[]> {
	const files = readdirSync(mail.dir).filter((f) => f.endsWith('.eml'));
	const raws = files.map((f) => readFileSync(path.join(mail.dir, f))).filter((b) => b.includes(messageId));
	return Promise.all(raws.map((b) => simpleParser(b)));
}

const dir = mkdtempSync(path.join(tmpdir(), 'fb-report-'));
function pdfText(pdf: Buffer): string {
	const file = path.join(dir, `${uuidv7()}.pdf`);
	writeFileSync(file, pdf);
	return execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

beforeAll(async () => {
	ws = await makeWorkshop('Reports');
	const l = ws.users.lead.actor;
	await saveReportSettings(l, 0, { address: '3 Harrow Lane, Millbrook', phone: '0100 555 0199', email: '', paper: 'a4', linkDays: 30, techniciansSend: false });
	consenting = (await customers.create(l, { name: 'Orla Brindle', email: `orla-${uuidv7().slice(-8)}@example.net`, reportConsent: true })).id as string;
	refusing = (await customers.create(l, { name: 'Cato Fenwick', email: 'cato@example.net', reportConsent: false })).id as string;
	vehicleId = (await vehicles.create(l, { vin: '0CV4SB219KT000417', make: 'Corvane', model: 'Brisel', year: 2019, plate: 'TB24 KQL', customerId: consenting })).id as string;
	componentId = (await components.create(l, { partNumber: `RP-${uuidv7().slice(-6)}`, kind: 'ignition_coil' })).id as string;
	const draft = await sheets.create(l, { componentId, checks: CHECKS });
	sheetId = draft.id as string;
	await sheets.update(l, sheetId, draft.version as number, {}, { serverFields: { state: 'approved', approvedBy: l.userId, approvedAt: new Date() } });
	lead = await signedIn(ws, 'lead');
	tech = await signedIn(ws, 'technician');
});

describe('a report sent by e-mail', () => {
	it('is queued, sent once through the mail server, and reads back with its PDF and working link', async () => {
		const job = await testedJob(consenting);
		const { status, html, preview } = await send(lead, job.id, { workDone: 'Replaced the coil on cylinder 3.' });
		expect(status, html.slice(0, 300)).toBe(200);
		expect(html).toContain('Queued for e-mail to');
		const [row] = await reportRows(job.id);
		expect(['queued', 'sending', 'sent']).toContain(row.state);

		const sent = await until('the message to be sent', async () => (await reportRows(job.id)).find((r) => r.state === 'sent'));
		expect(sent.link_secret).toBeNull(); // only the token's hash is left in the database
		const [message, ...more] = await caught(messageIdOf(`report-${row.id}`));
		expect(more).toHaveLength(0);
		const to = preview.customer!.email!;
		expect(message.to && !Array.isArray(message.to) ? message.to.text : '').toBe(to);
		expect(message.subject).toBe(`Your vehicle report: job ${job.number}, ${ws.workshop.name}`);

		const finding = 'The coil on cylinder 3 measured well above its limit (primary winding): it should be replaced.';
		expect(message.text).toContain('Dear Orla Brindle,');
		expect(message.text).toContain(finding);
		expect(message.text).toContain('vehicle maker’s procedure and on local regulations');

		expect(message.attachments).toHaveLength(1);
		expect(message.attachments[0].contentType).toBe('application/pdf');
		const text = pdfText(message.attachments[0].content);
		expect(text).toContain(`Vehicle report, job ${job.number}`);
		expect(text).toContain(finding);
		expect(text).toContain('Primary winding: 0.92 Ω. Maker’s figure: 0.36 to 0.55 Ω (engine cold, below 50 °C). Result: over spec.');
		expect(text).toContain('Replaced the coil on cylinder 3.');

		const link = /http:\/\/\S+\/r\/[A-Za-z0-9_-]{43}/.exec(message.text ?? '')?.[0];
		expect(link).toBeTruthy();
		const page = await fetch(link!);
		expect(page.status).toBe(200);
		expect(await page.text()).toContain(finding);
		const pdf = await fetch(`${link}/pdf`);
		expect(pdf.headers.get('content-type')).toBe('application/pdf');
		expect(Buffer.from(await pdf.arrayBuffer()).equals(message.attachments[0].content)).toBe(true);
		const letter = Buffer.from(await (await fetch(`${link}/pdf?paper=letter`)).arrayBuffer());
		expect(pdfText(letter)).toContain(finding);

		const history = await (await lead.get(`/jobs/${job.id}`, 'text/html')).text();
		expect(history).toContain(`E-mail to ${to}`);
		expect(history).toMatch(/data-state="sent"/);
	});

	it('stays queued while the mail server is down and goes exactly once when it is back', async () => {
		const job = await testedJob(consenting, 'No start in the morning');
		await stopMailServer(mail.name);
		try {
			const { status } = await send(lead, job.id);
			expect(status).toBe(200);
			const [row] = await until('a failed attempt', async () => {
				const rows = await reportRows(job.id);
				return rows[0]?.attempts && rows[0].attempts >= 2 && rows[0].state === 'queued' ? rows : null;
			});
			expect(row.last_reply).toMatch(/ECONNREFUSED|connect/i);
			expect(await caught(messageIdOf(`report-${row.id}`))).toHaveLength(0);
			const history = await (await lead.get(`/jobs/${job.id}`, 'text/html')).text();
			expect(history).toMatch(/data-state="queued"|data-state="sending"/);
			expect(history).not.toMatch(/data-state="sent"/);
		} finally {
			await startMailServer(mail.name, mail.port);
		}
		const [row] = await reportRows(job.id);
		await until('the message to be sent', async () => (await reportRows(job.id))[0].state === 'sent', 60_000);
		expect(await caught(messageIdOf(`report-${row.id}`))).toHaveLength(1);
		const attempts = await db().query<{ outcome: string; reply: string | null }>(
			`SELECT a.outcome, a.reply FROM mail_attempts a JOIN mail_outbox o ON o.id = a.outbox_id WHERE o.report_id = ? ORDER BY a.id`,
			{ replacements: [row.id], type: QueryTypes.SELECT }
		);
		expect(attempts.at(-1)).toMatchObject({ outcome: 'sent' });
		expect(attempts.slice(0, -1).every((a) => a.outcome === 'retry' && a.reply)).toBe(true);
	});

	it('is refused with a clear message when the customer has not agreed to e-mail', async () => {
		const job = await testedJob(refusing, 'Battery flat after a weekend');
		const { status, html } = await send(lead, job.id);
		expect(status).toBe(400);
		expect(html).toContain('Cato Fenwick has not agreed to receive reports by e-mail');
		expect(await reportRows(job.id)).toHaveLength(0);
		// The link can still be handed over.
		const asLink = await send(lead, job.id, { channel: 'link' });
		expect(asLink.status).toBe(200);
		expect(asLink.html).toMatch(/\/r\/[A-Za-z0-9_-]{43}/);
		expect((await reportRows(job.id))[0].state).toBeNull();
	});

	it('marks a message failed with the server’s reply when the address is refused for good', async () => {
		const l = ws.users.lead.actor;
		const who = (await customers.create(l, { name: 'Refusing Box', email: 'refuse-all@example.net', reportConsent: true })).id as string;
		const job = await testedJob(who, 'Lights flicker');
		expect((await send(lead, job.id)).status).toBe(200);
		const [row] = await until('the refusal', async () => {
			const rows = await reportRows(job.id);
			return rows[0]?.state === 'failed' ? rows : null;
		});
		expect(row.attempts).toBe(1);
		expect(row.last_reply).toMatch(/^550 .*Mailbox unavailable/);
		const history = await (await lead.get(`/jobs/${job.id}`, 'text/html')).text();
		expect(history).toContain('Not sent');
		expect(history).toContain('Mailbox unavailable');
	});
});

describe('report links', () => {
	async function linkOf(jobId: string) {
		const { html } = await send(lead, jobId, { channel: 'link' });
		return /http:\/\/[^\s<"]+\/r\/[A-Za-z0-9_-]{43}/.exec(html)![0];
	}

	it('answer 410 with a kind sentence once withdrawn, and the e-mail not yet sent is stopped', async () => {
		const job = await testedJob(consenting, 'Stalls at junctions');
		const link = await linkOf(job.id);
		expect((await fetch(link)).status).toBe(200);
		const [row] = await reportRows(job.id);
		// An e-mail of this report waiting for its next try is stopped by the withdrawal.
		const waiting = uuidv7();
		await db().query(
			`INSERT INTO mail_outbox (id, workshop_id, report_id, idempotency_key, message_id, to_address, subject, text_body, state,
			   next_attempt_at, created_at, updated_at)
			 VALUES (?, ?, ?, ?, '<x@y>', 'desk@example.net', 'Waiting', 'Waiting.', 'queued', UTC_TIMESTAMP(3) + INTERVAL 1 HOUR,
			   UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
			{ replacements: [waiting, ws.workshop.id, row.id, `test-${waiting}`], type: QueryTypes.INSERT }
		);
		const w = await lead.form(`/jobs/${job.id}?/withdrawReport`, { reportId: row.id });
		expect(w.status).toBe(200);
		const gone = await fetch(link);
		expect(gone.status).toBe(410);
		expect(await gone.text()).toContain(`${ws.workshop.name} has withdrawn this link`);
		expect((await fetch(`${link}/pdf`)).status).toBe(410);
		const [stopped] = await db().query<{ state: string; last_reply: string }>('SELECT state, last_reply FROM mail_outbox WHERE id = ?', {
			replacements: [waiting],
			type: QueryTypes.SELECT
		});
		expect(stopped).toEqual({ state: 'failed', last_reply: 'Not sent: the report was withdrawn before it left.' });
	});

	it('answer 410 once expired, and 404 for a token that was never made', async () => {
		const job = await testedJob(consenting, 'Warning light on');
		const link = await linkOf(job.id);
		await db().query('UPDATE reports SET expires_at = UTC_TIMESTAMP(3) - INTERVAL 1 SECOND WHERE job_id = ?', {
			replacements: [job.id],
			type: QueryTypes.UPDATE
		});
		const gone = await fetch(link);
		expect(gone.status).toBe(410);
		expect(await gone.text()).toContain('This link has expired');
		expect((await fetch(`${base}/r/${'A'.repeat(43)}`)).status).toBe(404);
	});

	it('are only withdrawn by a lead', async () => {
		const job = await testedJob(consenting, 'Hesitates');
		await linkOf(job.id);
		const [row] = await reportRows(job.id);
		const r = await tech.form(`/jobs/${job.id}?/withdrawReport`, { reportId: row.id });
		expect(r.status).toBe(403);
	});
});

describe('who sends reports', () => {
	it('is leads and owners; technicians on their own jobs only when the workshop allows it; never apprentices', async () => {
		const job = await testedJob(consenting, 'Rough idle');
		expect((await lead.get(`/jobs/${job.id}/report`, 'text/html')).status).toBe(200);
		expect((await (await signedIn(ws, 'owner')).get(`/jobs/${job.id}/report`, 'text/html')).status).toBe(200);
		expect((await tech.get(`/jobs/${job.id}/report`, 'text/html')).status).toBe(403);
		expect((await (await signedIn(ws, 'apprentice')).get(`/jobs/${job.id}/report`, 'text/html')).status).toBe(403);
		const l = ws.users.lead.actor;
		await saveReportSettings(l, 1, { address: '3 Harrow Lane, Millbrook', phone: '0100 555 0199', email: '', paper: 'a4', linkDays: 30, techniciansSend: true });
		try {
			expect((await tech.get(`/jobs/${job.id}/report`, 'text/html')).status).toBe(200);
			const asTech = await send(tech, job.id, { channel: 'link' });
			expect(asTech.status).toBe(200);
			// Not on a job assigned to someone else.
			const other = await jobs.create(l, { complaint: 'Not theirs', customerId: consenting, assigneeId: ws.users.apprentice.id });
			expect((await tech.get(`/jobs/${other.id}/report`, 'text/html')).status).toBe(403);
		} finally {
			await saveReportSettings(l, 2, { address: '3 Harrow Lane, Millbrook', phone: '0100 555 0199', email: '', paper: 'a4', linkDays: 30, techniciansSend: false });
		}
	});
});

describe('apprentice work', () => {
	it('stays out of the report until a lead signs it off', async () => {
		const l = ws.users.lead.actor;
		const job = await jobs.create(l, { complaint: 'Cranks, no start', customerId: consenting, vehicleId, assigneeId: ws.users.apprentice.id });
		const apprentice = await signedIn(ws, 'apprentice');
		const t = create('test', { jobId: job.id, componentId, sheetId, position: '1', meter: METER, temperature: { mode: 'measured', tempC: 20 } });
		const reading = create('reading', { testId: t.entityId, checkKey: 'primary', position: '1', samples: [{ value: 0.48, unit: 'Ω' }], rangeLabel: '200 Ω' });
		expect((await push(apprentice, 'phone-apprentice', [t, reading])).map((x) => x.status)).toEqual(['applied', 'applied']);

		const before = await previewReport(l, job.id as string);
		expect(before.awaitingSignOff).toBe(1);
		expect(before.doc.findings).toEqual([]);
		const page = (await (await lead.get(`/jobs/${job.id}/report`, 'text/html')).text()).replace(/\s+/g, ' ');
		expect(page).toContain('One test logged by an apprentice is left out until a lead signs it off.');

		const signoff = create('signoff', { testId: t.entityId, mode: 'witnessed' });
		expect((await push(lead, 'desk-lead', [signoff]))[0].status).toBe('applied');
		const after = await previewReport(l, job.id as string);
		expect(after.awaitingSignOff).toBe(0);
		expect(after.doc.findings.map((f) => f.outcomeText)).toEqual(['OK']);
	});
});

describe('circuit tests in the report', () => {
	/*
	 * The figures are those of the judge's sourced unit tests (tests/unit/flow/circuit.test.ts):
	 * 12.24 V at 80 °F is 50 % charged (Battery Council International's table), too flat to
	 * judge; a 120 mA draw against the common-practice 50 mA on 70 Ah, half usable, is flat in
	 * 70 × 0.5 ÷ 0.12 ÷ 24 = 12.2 days (arithmetic).
	 */
	const BATTERY = { batteryType: 'flooded', standard: 'sae_j537', ratedA: 600, tempC: (80 - 32) * (5 / 9), surfaceGone: true, restV: 12.24, method: 'conductance', measuredA: 250, minCapability: 75 };
	const DRAW = { capacityAh: 70, usablePct: 50, drawMa: 120, limitMa: 50, waitMin: 45, waitStartedAt: '2026-12-02T08:00:00.000Z' };
	const drainSentence = 'With the vehicle switched off and asleep, something keeps drawing too much current from the battery: the cause needs tracing. A charged battery would be too flat to start the engine after about 12.2 days.';
	const drawFigure = 'Current drawn with everything off: 120 mA. Judged against: at most 50 mA. Result: over spec.';

	it('go out by e-mail with their outcome, sentence, figures and limits, in the text, the PDF and the page', async () => {
		const l = ws.users.lead.actor;
		const job = await jobs.create(l, { complaint: 'Flat battery after a weekend parked', customerId: consenting, vehicleId, assigneeId: ws.users.technician.id });
		const ops = [create('circuit_test', { jobId: job.id, kind: 'battery', inputs: BATTERY }), create('circuit_test', { jobId: job.id, kind: 'parasitic', inputs: DRAW })];
		expect((await push(tech, 'phone-circuits', ops)).map((x) => x.status)).toEqual(['applied', 'applied']);

		const { status, preview } = await send(lead, job.id as string);
		expect(status).toBe(200);
		expect(preview.doc.findings.map((f) => [f.title, f.outcomeText])).toEqual([
			['Battery', 'Can’t tell'],
			['Battery drain with the vehicle switched off', 'Out of spec']
		]);
		const [row] = await reportRows(job.id as string);
		await until('the message to be sent', async () => (await reportRows(job.id as string)).find((r) => r.state === 'sent'));
		const [message] = await caught(messageIdOf(`report-${row.id}`));
		expect(message.text).toContain(`- Battery drain with the vehicle switched off: ${drainSentence}`);
		expect(message.text).toContain('- Battery: The battery was too flat to judge its condition: it needs a full charge and then testing again.');
		const text = pdfText(message.attachments[0].content);
		expect(text).toContain(drainSentence);
		expect(text).toContain(drawFigure);
		expect(text).toContain('State of charge: 50 %. Judged against: at least 75 % to judge the battery. Result: can’t tell — too flat to judge.');
		expect(text).toContain('Checked: current drawn with everything off');

		const link = /http:\/\/\S+\/r\/[A-Za-z0-9_-]{43}/.exec(message.text ?? '')![0];
		const page = (await (await fetch(link)).text()).replace(/\s+/g, ' ');
		expect(page).toContain(drainSentence);
		expect(page).toContain('Judged against: at most 50 mA. Result: over spec.');
	});

	it('leave an apprentice’s circuit test out until a lead signs it off', async () => {
		const l = ws.users.lead.actor;
		const job = await jobs.create(l, { complaint: 'Battery light on', customerId: consenting, vehicleId, assigneeId: ws.users.apprentice.id });
		const apprentice = await signedIn(ws, 'apprentice');
		const draw = create('circuit_test', { jobId: job.id, kind: 'parasitic', inputs: DRAW });
		expect((await push(apprentice, 'phone-apprentice-c', [draw]))[0].status).toBe('applied');

		const before = await previewReport(l, job.id as string);
		expect(before.awaitingSignOff).toBe(1);
		expect(before.doc.findings).toEqual([]);
		const page = (await (await lead.get(`/jobs/${job.id}/report`, 'text/html')).text()).replace(/\s+/g, ' ');
		expect(page).toContain('One test logged by an apprentice is left out until a lead signs it off.');

		const r = await lead.json('POST', `/api/tests/${draw.entityId}/signoff`, {});
		expect(r.status, await r.clone().text()).toBe(201);
		const after = await previewReport(l, job.id as string);
		expect(after.awaitingSignOff).toBe(0);
		expect(after.doc.findings.map((f) => f.sentence)).toEqual([drainSentence]);
	});
});

describe('the outbox with several senders', () => {
	it('sends each message exactly once while five workers claim at the same time', async () => {
		const keys = Array.from({ length: 12 }, () => `test-${uuidv7()}`);
		await db().transaction(async (t) => {
			for (const key of keys)
				await enqueueMail(t, { workshopId: ws.workshop.id, reportId: null, idempotencyKey: key, to: 'desk@example.net', subject: 'Outbox test', text: 'One of twelve.', link: null, createdBy: null });
		});
		// Three workers in this process, besides the app's own processes polling the same table.
		const cfg = mailConfig({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(mail.port), SMTP_IGNORE_TLS: 'true', MAIL_RETRY_BASE_MS: '300' });
		await Promise.all([runMailOnce(cfg), runMailOnce(cfg), runMailOnce(cfg)]);
		await until('all twelve to be sent', async () => {
			const [r] = await db().query<{ n: number }>(`SELECT COUNT(*) AS n FROM mail_outbox WHERE idempotency_key IN (?) AND state = 'sent'`, {
				replacements: [keys],
				type: QueryTypes.SELECT
			});
			return Number(r.n) === keys.length;
		});
		for (const key of keys) expect(await caught(messageIdOf(key)), key).toHaveLength(1);
	});

	it('takes up a message whose sender stopped mid-send once its lease ran out, and records the interrupted attempt', async () => {
		const key = `test-${uuidv7()}`;
		const id = uuidv7();
		await db().query(
			`INSERT INTO mail_outbox (id, workshop_id, idempotency_key, message_id, to_address, subject, text_body, state, attempts,
			   next_attempt_at, lease_token, lease_until, created_at, updated_at)
			 VALUES (?, ?, ?, ?, 'desk@example.net', 'Lease test', 'Left behind by a stopped process.', 'sending', 1,
			   UTC_TIMESTAMP(3), ?, UTC_TIMESTAMP(3) - INTERVAL 1 SECOND, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
			{ replacements: [id, ws.workshop.id, key, messageIdOf(key), uuidv7()], type: QueryTypes.INSERT }
		);
		await db().query(
			`INSERT INTO mail_attempts (outbox_id, attempt, worker, outcome, started_at) VALUES (?, 1, 'stopped-process', 'sending', UTC_TIMESTAMP(3))`,
			{ replacements: [id], type: QueryTypes.INSERT }
		);
		await until('the message to be sent', async () => {
			const [r] = await db().query<{ state: string }>('SELECT state FROM mail_outbox WHERE id = ?', { replacements: [id], type: QueryTypes.SELECT });
			return r.state === 'sent';
		});
		const attempts = await db().query<{ attempt: number; outcome: string }>('SELECT attempt, outcome FROM mail_attempts WHERE outbox_id = ? ORDER BY id', {
			replacements: [id],
			type: QueryTypes.SELECT
		});
		expect(attempts).toEqual([
			{ attempt: 1, outcome: 'interrupted' },
			{ attempt: 2, outcome: 'sent' }
		]);
		expect(await caught(messageIdOf(key))).toHaveLength(1);
	});
});
