/**
 * Evidence photos against the local fake photo store (s3rver, started by the runner): the
 * upload's checks (type by content, 10 MB, the phone's SHA-256, the object stored before the
 * record), the photo's place (a test and reading of its own job only), the thumbnail, who may
 * see a photo and its download address, the address's
 * expiry, marks (remove, for the customer) through the API and sync, and the cleanup job.
 *
 * References outside the project: the file signatures are those of the formats' own
 * specifications (JPEG: ITU-T T.81 Annex B, SOI marker FF D8; PNG: ISO/IEC 15948 §5.2, the
 * 8-byte signature; WebP: the RIFF container, "RIFF" … "WEBP"); SHA-256 is Node's own
 * (FIPS 180-4); picture sizes are read back with sharp (libvips), not with project code.
 */
import { createHash } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { customerPhotos, purgeRemovedPhotos } from '../../src/lib/server/photos/service';
import { renderReportPdf } from '../../src/lib/server/reports/pdf';
import { digestOf, previewReport } from '../../src/lib/server/reports/service';
import { getObject, headObject } from '../../src/lib/server/photos/storage';
import { jobs } from '../../src/lib/server/services/jobs';
import { makeWorkshop } from '../helpers/fixtures';
import { deskWorkshop, meter, signedIn } from '../helpers/desk';
import type { Client } from '../helpers/http';
import { expectError } from '../helpers/records';
import { create, pullAll, push } from '../helpers/sync';

const base = inject('baseURL');
let w: Awaited<ReturnType<typeof deskWorkshop>>;
let other: Awaited<ReturnType<typeof makeWorkshop>>;
let as: Record<'lead' | 'technician' | 'apprentice' | 'otherLead', Client>;
let jobId: string;

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const rows = (sql: string, ...replacements: unknown[]) =>
	db().query<Record<string, unknown>>(sql, { replacements, type: QueryTypes.SELECT });

/** An invented test picture: a grey field with a darker block, `w`×`h`, as JPEG. */
const jpeg = (width = 1200, height = 900, shade = 120) =>
	sharp({ create: { width, height, channels: 3, background: { r: shade, g: shade, b: shade } } })
		.composite([{ input: { create: { width: Math.floor(width / 3), height: Math.floor(height / 3), channels: 3, background: '#202020' } }, left: 4, top: 4 }])
		.jpeg({ quality: 85 })
		.toBuffer();

function upload(c: Client, id: string, body: Buffer, params: Record<string, string>, type = 'image/jpeg') {
	return fetch(`${base}/api/photos/${id}?${new URLSearchParams(params)}`, {
		method: 'PUT',
		headers: c.headers({ 'content-type': type, accept: 'application/json' }),
		body: new Uint8Array(body)
	});
}

beforeAll(async () => {
	w = await deskWorkshop(base, 'Photos');
	other = await makeWorkshop('Elsewhere');
	as = {
		lead: await signedIn(base, w.users.lead.email),
		technician: await signedIn(base, w.users.technician.email),
		apprentice: await signedIn(base, w.users.apprentice.email),
		otherLead: await signedIn(base, other.users.lead.email)
	};
	const job = await jobs.create(w.users.lead.actor, { complaint: 'Misfire under load', assigneeId: w.users.technician.id });
	jobId = job.id as string;
});

describe('upload', () => {
	it('stores the photo and a thumbnail under unguessable keys of the workshop, then the record', async () => {
		const bytes = await jpeg();
		const id = uuidv7();
		const r = await upload(as.technician, id, bytes, { jobId, sha256: sha(bytes), caption: 'Cracked boot, cylinder 3' });
		const body = await r.json();
		expect(r.status, JSON.stringify(body)).toBe(201);
		expect(body.photo).toMatchObject({ id, jobId, caption: 'Cracked boot, cylinder 3', sha256: sha(bytes), contentType: 'image/jpeg', bytes: bytes.length, width: 1200, height: 900 });
		expect(body.photo.objectKey).toBeUndefined();
		const [row] = await rows('SELECT object_key, thumb_key FROM photos WHERE id = ?', id);
		const key = String(row.object_key);
		expect(key.startsWith(`workshops/${w.workshop.id}/photos/`)).toBe(true);
		// 24 random bytes in base64url: 32 characters nobody can guess.
		expect(key.split('/').pop()!.replace(/\.jpg$/, '')).toMatch(/^[A-Za-z0-9_-]{32}$/);
		expect(await headObject(key)).toMatchObject({ bytes: bytes.length, sha256: sha(bytes) });
		expect(sha((await getObject(key))!)).toBe(sha(bytes));
		const thumb = await sharp((await getObject(String(row.thumb_key)))!).metadata();
		expect(thumb.format).toBe('jpeg');
		expect(Math.max(thumb.width!, thumb.height!)).toBe(320);

		// The same photo sent again (a retry after a lost answer) is the same photo.
		const again = await upload(as.technician, id, bytes, { jobId, sha256: sha(bytes) });
		expect(again.status).toBe(200);
		expect((await rows('SELECT id FROM photos WHERE id = ?', id)).length).toBe(1);
		// The lead's phone gets the record by pull, without where it is stored.
		const { changes } = await pullAll(as.lead);
		const pulled = changes.find((c) => c.entity === 'photo' && c.entityId === id);
		expect(pulled?.record).toMatchObject({ jobId, sha256: sha(bytes) });
		expect(pulled?.record).not.toHaveProperty('objectKey');
		// The job's list on the lead's desk.
		const list = await (await as.lead.get(`/api/jobs/${jobId}/photos`)).json();
		expect(list.photos.map((p: { id: string }) => p.id)).toContain(id);
	});

	it('accepts PNG and WebP by their content', async () => {
		for (const [fmt, type] of [['png', 'image/png'], ['webp', 'image/webp']] as const) {
			const bytes = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#556677' } })[fmt]().toBuffer();
			// Sent with a misleading declared type: the content decides.
			const r = await upload(as.technician, uuidv7(), bytes, { jobId, sha256: sha(bytes) }, 'application/octet-stream');
			expect(r.status).toBe(201);
			expect((await r.json()).photo.contentType).toBe(type);
		}
	});

	it('refuses a photo whose SHA-256 does not match, and keeps no record', async () => {
		const bytes = await jpeg(400, 300);
		const id = uuidv7();
		const damaged = Buffer.from(bytes);
		damaged[damaged.length - 10] ^= 0xff;
		await expectError(await upload(as.technician, id, damaged, { jobId, sha256: sha(bytes) }), 400, 'checksum_mismatch');
		expect(await rows('SELECT id FROM photos WHERE id = ?', id)).toEqual([]);
	});

	it('refuses what is not a JPEG, PNG or WebP by its content, whatever its declared type', async () => {
		const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer\n%%EOF\n');
		const gif = await sharp({ create: { width: 10, height: 10, channels: 3, background: '#000' } }).gif().toBuffer();
		for (const bytes of [pdf, gif]) {
			const e = await expectError(await upload(as.technician, uuidv7(), bytes, { jobId, sha256: sha(bytes) }, 'image/jpeg'), 415, 'unsupported_type');
			expect(e.message).toMatch(/JPEG, PNG or WebP/);
		}
	});

	it('refuses more than 10 MB with 413', async () => {
		const big = Buffer.alloc(10 * 1024 * 1024 + 1, 0x41);
		big.set([0xff, 0xd8, 0xff, 0xe0]);
		await expectError(await upload(as.technician, uuidv7(), big, { jobId, sha256: sha(big) }), 413, 'too_large');
	});

	it('names the field that is missing or wrong', async () => {
		const bytes = await jpeg(100, 100);
		const e = await expectError(await upload(as.technician, uuidv7(), bytes, { jobId }), 400, 'invalid');
		expect(Object.keys(e.fields!)).toContain('sha256');
	});

	it('hangs a photo on a reading of its own job and test only, and lists it under that reading', async () => {
		const otherJob = (await jobs.create(w.users.lead.actor, { complaint: 'No start when hot', assigneeId: w.users.technician.id })).id as string;
		const test = (job: string) =>
			create('test', {
				jobId: job,
				componentId: w.componentId,
				sheetId: w.sheetId,
				partNumber: w.partNumber,
				position: '1',
				meter: meter('Bench meter 1', 0.1),
				temperature: { mode: 'measured', tempC: 20 }
			});
		const reading = (testId: string) =>
			create('reading', { testId, checkKey: 'primary', position: '1', samples: [{ value: 0.62, unit: 'Ω' }], rangeLabel: '200 Ω' });
		const [t1, t2, tElse] = [test(jobId), test(jobId), test(otherJob)];
		const [r1, r2, rElse] = [reading(t1.entityId), reading(t2.entityId), reading(tElse.entityId)];
		const ops = [t1, t2, tElse, r1, r2, rElse];
		expect((await push(as.technician, 'phone-reading-photos', ops)).map((x) => x.status)).toEqual(Array(ops.length).fill('applied'));

		const bytes = await jpeg(320, 240, 150);
		const refused: string[] = [];
		const refuse = async (params: Record<string, string>) => {
			const id = uuidv7();
			refused.push(id);
			const e = await expectError(await upload(as.technician, id, bytes, { jobId, sha256: sha(bytes), ...params }), 400, 'wrong_place');
			expect(e.message).toMatch(/not .*on this job/);
		};
		// A reading of another job (with its own test, or with this job's test) …
		await refuse({ testId: tElse.entityId, readingId: rElse.entityId });
		await refuse({ testId: t1.entityId, readingId: rElse.entityId });
		// … a reading of this job's other test, a reading nobody has, a test of another job.
		await refuse({ testId: t1.entityId, readingId: r2.entityId });
		await refuse({ testId: t1.entityId, readingId: uuidv7() });
		await refuse({ testId: tElse.entityId });
		expect(await rows('SELECT id FROM photos WHERE id IN (?)', refused)).toEqual([]);

		const onReading = uuidv7();
		const r = await upload(as.technician, onReading, bytes, { jobId, testId: t1.entityId, readingId: r1.entityId, sha256: sha(bytes), caption: 'Primary winding, cylinder 1' });
		const body = await r.json();
		expect(r.status, JSON.stringify(body)).toBe(201);
		expect(body.photo).toMatchObject({ id: onReading, jobId, testId: t1.entityId, readingId: r1.entityId });
		// Sent without its test, the photo takes the reading's.
		const noTest = uuidv7();
		const r2Photo = await upload(as.technician, noTest, bytes, { jobId, readingId: r2.entityId, sha256: sha(bytes) });
		expect(r2Photo.status).toBe(201);
		expect((await r2Photo.json()).photo).toMatchObject({ testId: t2.entityId, readingId: r2.entityId });

		// Listed under its reading on the desk and on the phones (by pull).
		const list = (await (await as.lead.get(`/api/jobs/${jobId}/photos`)).json()).photos as { id: string; readingId: string | null; testId: string | null }[];
		expect(list.filter((p) => p.readingId === r1.entityId).map((p) => p.id)).toEqual([onReading]);
		expect(list.filter((p) => p.readingId === r2.entityId).map((p) => p.id)).toEqual([noTest]);
		const { changes } = await pullAll(as.lead);
		expect(changes.find((c) => c.entity === 'photo' && c.entityId === onReading)?.record).toMatchObject({ readingId: r1.entityId, testId: t1.entityId });
	});

	it('refuses a job of another workshop, or one the technician does not see, as not found', async () => {
		const bytes = await jpeg(200, 100);
		await expectError(await upload(as.otherLead, uuidv7(), bytes, { jobId, sha256: sha(bytes) }), 404, 'not_found');
		await expectError(await upload(as.apprentice, uuidv7(), bytes, { jobId, sha256: sha(bytes) }), 404, 'not_found');
	});
});

describe('seeing a photo', () => {
	let id: string;
	let bytes: Buffer;
	beforeAll(async () => {
		bytes = await jpeg(640, 480, 90);
		id = uuidv7();
		expect((await upload(as.technician, id, bytes, { jobId, sha256: sha(bytes) })).status).toBe(201);
	});

	it('gives members who may open the job the bytes and a download address; another workshop gets 404', async () => {
		const full = await as.lead.get(`/api/photos/${id}/file?size=full`, 'image/*');
		expect(full.status).toBe(200);
		expect(sha(Buffer.from(await full.arrayBuffer()))).toBe(sha(bytes));
		const thumb = await as.technician.get(`/api/photos/${id}/file`, 'image/*');
		expect((await sharp(Buffer.from(await thumb.arrayBuffer())).metadata()).width).toBe(320);
		await expectError(await as.otherLead.get(`/api/photos/${id}`), 404, 'not_found');
		await expectError(await as.otherLead.get(`/api/photos/${id}/file?size=full`), 404, 'not_found');
		await expectError(await as.otherLead.get(`/api/jobs/${jobId}/photos`), 404, 'not_found');
		await expectError(await as.apprentice.get(`/api/photos/${id}`), 404, 'not_found');
	});

	it('gives a download address that works until it expires (PHOTO_URL_SECONDS = 2 in the tests)', async () => {
		const r = await as.lead.get(`/api/photos/${id}`);
		const links = await r.json();
		expect(r.status).toBe(200);
		expect(new Date(links.expiresAt).getTime() - Date.now()).toBeLessThanOrEqual(2000);
		const now = await fetch(links.url);
		expect(now.status).toBe(200);
		expect(sha(Buffer.from(await now.arrayBuffer()))).toBe(sha(bytes));
		await new Promise((r) => setTimeout(r, 3100));
		const later = await fetch(links.url);
		await later.arrayBuffer();
		expect(later.status).toBe(403);
	});
});

describe('marks and cleanup', () => {
	it('chooses a photo for the customer and removes one; only its author or a lead; objects go after 30 days', async () => {
		const [a, b] = [await jpeg(300, 200, 60), await jpeg(300, 200, 200)];
		const [ida, idb] = [uuidv7(), uuidv7()];
		expect((await upload(as.technician, ida, a, { jobId, sha256: sha(a), caption: 'Burnt connector' })).status).toBe(201);
		expect((await upload(as.technician, idb, b, { jobId, sha256: sha(b) })).status).toBe(201);

		// The lead chooses a for the customer from the desk.
		expect((await as.lead.json('POST', `/api/photos/${ida}/marks`, { mark: 'for_customer' })).status).toBe(201);
		await expectError(await as.lead.json('POST', `/api/photos/${ida}/marks`, { mark: 'hidden' }), 400, 'invalid');
		const chosen = await customerPhotos(w.users.lead.actor, jobId);
		expect(chosen.map((p) => p.id)).toEqual([ida]);
		expect(chosen[0].caption).toBe('Burnt connector');
		expect(chosen[0].src.startsWith('data:image/jpeg;base64,')).toBe(true);
		// The customer report shows it: in the preview's words and as a picture in the PDF
		// (read back with poppler's pdfimages and pdftotext, not with project code).
		const { doc } = await previewReport(w.users.lead.actor, jobId);
		expect(doc.photos.map((p) => [p.id, p.caption])).toEqual([[ida, 'Burnt connector']]);
		const dir = mkdtempSync(path.join(tmpdir(), 'fieldbench-photos-'));
		try {
			const file = path.join(dir, 'report.pdf');
			writeFileSync(file, await renderReportPdf(doc, { paper: 'a4' }));
			const images = execFileSync('pdfimages', ['-list', file], { encoding: 'utf8' }).trim().split('\n').slice(2);
			expect(images.length).toBe(1);
			expect(execFileSync('pdftotext', [file, '-'], { encoding: 'utf8' })).toContain('Burnt connector');
		} finally {
			rmSync(dir, { recursive: true, force: true });
		}

		// Another workshop's lead does not find it.
		await expectError(await as.otherLead.json('POST', `/api/photos/${idb}/marks`, { mark: 'removed' }), 404, 'not_found');
		// The technician removes b from the phone, through sync; a photo itself never comes by sync.
		const results = await push(as.technician, 'phone-photos', [
			create('photo_mark', { photoId: idb, mark: 'removed' }),
			create('photo', { jobId, sha256: sha(b) })
		]);
		expect(results.map((r) => r.status)).toEqual(['applied', 'rejected']);
		expect(results[1].reason).toBe('invalid');
		const list = await (await as.lead.get(`/api/jobs/${jobId}/photos`)).json();
		const ids = list.photos.map((p: { id: string }) => p.id);
		expect(ids).toContain(ida);
		expect(ids).not.toContain(idb);
		await expectError(await as.lead.get(`/api/photos/${idb}/file`), 404, 'not_found');
		const { changes } = await pullAll(as.lead);
		expect(changes.find((c) => c.entity === 'photo_mark' && c.record?.photoId === idb)?.record).toMatchObject({ mark: 'removed' });

		// The cleanup job: nothing is deleted before 30 days, b's objects after.
		const [row] = await rows('SELECT object_key, thumb_key FROM photos WHERE id = ?', idb);
		expect(await purgeRemovedPhotos(new Date(Date.now() + 29 * 86_400_000))).toBe(0);
		expect(await headObject(String(row.object_key))).not.toBeNull();
		expect(await purgeRemovedPhotos(new Date(Date.now() + 31 * 86_400_000))).toBeGreaterThanOrEqual(1);
		expect(await headObject(String(row.object_key))).toBeNull();
		expect(await headObject(String(row.thumb_key))).toBeNull();
		const [ra] = await rows('SELECT object_key FROM photos WHERE id = ?', ida);
		expect(await headObject(String(ra.object_key))).not.toBeNull();
	});

	it('lets neither an apprentice nor another technician mark a photo they did not take', async () => {
		const bytes = await jpeg(120, 90);
		const id = uuidv7();
		expect((await upload(as.technician, id, bytes, { jobId, sha256: sha(bytes) })).status).toBe(201);
		// Reassigned to the apprentice: the apprentice sees the job but did not take the photo.
		const job = (await jobs.read(w.users.lead.actor, jobId)) as { version: number };
		await jobs.update(w.users.lead.actor, jobId, job.version, { assigneeId: w.users.apprentice.id });
		const e = await expectError(await as.apprentice.json('POST', `/api/photos/${id}/marks`, { mark: 'removed' }), 403, 'forbidden');
		expect(e.message).toMatch(/took the photo or a workshop lead/);
		await jobs.update(w.users.lead.actor, jobId, job.version + 1, { assigneeId: w.users.technician.id });
	});
});

describe('photos in the customer’s PDF', () => {
	/** pdfimages' listing of a PDF (poppler, not project code): each image's width and height. */
	function imagesOf(pdf: Buffer): { width: number; height: number }[] {
		const dir = mkdtempSync(path.join(tmpdir(), 'fieldbench-print-'));
		try {
			const file = path.join(dir, 'report.pdf');
			writeFileSync(file, pdf);
			return execFileSync('pdfimages', ['-list', file], { encoding: 'utf8' })
				.trim()
				.split('\n')
				.slice(2)
				.map((l) => l.trim().split(/\s+/))
				.map((c) => ({ width: Number(c[3]), height: Number(c[4]) }));
		} finally {
			rmSync(dir, { recursive: true, force: true });
		}
	}

	it('are printed from the original at most 1200 px on the long side (never enlarged), not as the 320 px thumbnail', async () => {
		const job = (await jobs.create(w.users.lead.actor, { complaint: 'Earth strap corroded', assigneeId: w.users.technician.id })).id as string;
		const [big, small] = [await jpeg(2400, 1600, 90), await jpeg(400, 300, 160)];
		const [idBig, idSmall] = [uuidv7(), uuidv7()];
		expect((await upload(as.technician, idBig, big, { jobId: job, sha256: sha(big), caption: 'Earth strap' })).status).toBe(201);
		expect((await upload(as.technician, idSmall, small, { jobId: job, sha256: sha(small), caption: 'Battery post' })).status).toBe(201);
		for (const id of [idBig, idSmall])
			expect((await as.lead.json('POST', `/api/photos/${id}/marks`, { mark: 'for_customer' })).status).toBe(201);

		// Sent as a link by the lead from the report page, then opened as the customer would.
		const { doc } = await previewReport(w.users.lead.actor, job);
		const sent = await as.lead.form(`/jobs/${job}/report?/send`, { sendKey: uuidv7(), digest: digestOf(doc), channel: 'link', paper: 'a4' });
		const link = /http:\/\/[^\s<"]+\/r\/[A-Za-z0-9_-]{43}/.exec(await sent.text())?.[0];
		expect(link, 'the report link').toBeTruthy();
		const pdf = Buffer.from(await (await fetch(`${link}/pdf`)).arrayBuffer());
		// 2400 × 1600 fitted inside 1200 × 1200 is 1200 × 800; 400 × 300 stays as it is.
		expect(imagesOf(pdf).map((i) => `${i.width}x${i.height}`).sort()).toEqual(['1200x800', '400x300']);
		const letter = Buffer.from(await (await fetch(`${link}/pdf?paper=letter`)).arrayBuffer());
		expect(imagesOf(letter).map((i) => `${i.width}x${i.height}`).sort()).toEqual(['1200x800', '400x300']);
		// Bounded: two photos at print size keep the report well under 1 MB.
		expect(pdf.length).toBeLessThan(1_000_000);
	});
});
