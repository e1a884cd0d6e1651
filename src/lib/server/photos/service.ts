/**
 * Evidence photos on the server.
 *
 * Upload (`PUT /api/photos/:id`, `uploadPhoto`): the phone sends the bytes of one photo with
 * its record's fields (job, test or reading, caption) and the SHA-256 it computed. In order:
 *  1. the fields (400 naming the field) and the job, which the actor must see (404 otherwise,
 *     as for another workshop's job; the rulebook's `refuseAppend`, as for any record of a job);
 *     a test must be one of the job's, a reading one of the job's readings (and of the test
 *     sent with it; the test is taken from the reading when none is sent) — 400 `wrong_place`
 *     otherwise (`photoPlace`);
 *  2. the bytes: at most `MAX_PHOTO_BYTES` (413, checked by the route before reading), a JPEG,
 *     PNG or WebP by their first bytes, never by a name or a declared type (415), the SHA-256
 *     the phone sent (400 `checksum_mismatch`: sent again, it arrives whole), a picture `sharp`
 *     can read (400);
 *  3. the object and a small JPEG thumbnail are stored under unguessable keys in the
 *     workshop's own prefix (`workshops/<workshop>/photos/<192 random bits>`), then read back
 *     (HEAD: there, the right size and checksum) — only then is the `photos` row written, with
 *     the next feed seq and an audit row, in one transaction. Phones get it by pull.
 * The same id sent again with the same bytes is the same photo (200, nothing stored twice);
 * with other bytes it is a 409.
 *
 * Marks (`photo_marks`, append-only): "remove" (a tombstone) and "for the customer", by the
 * person who took the photo or a lead (`photos/marks.ts`), from the desk (`markPhoto`) and
 * from phones through sync (`sync/append.ts` uses `photoFacts`).
 *
 * Reading: `jobPhotos` (the job's photos that are not removed, for whoever may open the job),
 * `photoFile` (the bytes, for the pages' `<img>`), `photoLinks` (short-lived presigned
 * download addresses) — for members of the owning workshop who may open the job; anyone else
 * gets 404. `customerPhotos` lists the photos chosen for the customer report.
 *
 * Cleanup (`purgeRemovedPhotos`): objects of photos removed more than `PURGE_DAYS` days ago are
 * deleted from storage and the row marked `purged_at` (run hourly by each app process and by
 * `npm run photos:cleanup`).
 */
import { createHash, randomBytes } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import sharp from 'sharp';
import { v7 as uuidv7 } from 'uuid';
import { z } from 'zod';
import { MAX_PHOTO_BYTES, photoStates, refusePhotoMark, type PhotoMark, PHOTO_MARKS } from '../../photos/marks';
import type { ReportPhoto } from '../../report/types';
import { isUuidV7 } from '../../sync/protocol';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { appendRecord } from '../db/append-tables';
import { nextSeq, writeAudit } from '../db/feed';
import { rawQuery, sqlDateTime } from '../db/raw';
import { AppError, ForbiddenError, IdConflictError, NotFoundError, ValidationError } from '../errors';
import { jobWithVehicle, refuseAppend, seenJob } from '../services/rules';
import { inTransaction } from '../services/write-path';
import { deleteObjects, downloadUrl, getObject, headObject, putObject, urlSeconds } from './storage';

/** Days between "remove" and the objects' deletion from storage. */
export const PURGE_DAYS = 30;

/** The photo's fields as the upload sends them (query parameters). */
export const photoUploadFields = z.object({
	jobId: z.uuid().transform((s) => s.toLowerCase()),
	testId: z
		.uuid()
		.transform((s) => s.toLowerCase())
		.nullish(),
	readingId: z
		.uuid()
		.transform((s) => s.toLowerCase())
		.nullish(),
	caption: z.string().trim().max(200, 'At most 200 characters').nullish(),
	sha256: z
		.string()
		.regex(/^[0-9a-fA-F]{64}$/, 'The SHA-256 of the photo, 64 hexadecimal digits')
		.transform((s) => s.toLowerCase()),
	deviceTime: z.iso.datetime({ offset: true }).nullish()
});

/** A photo mark's fields (desk and sync). */
export const photoMarkFields = z.object({
	photoId: z.uuid().transform((s) => s.toLowerCase()),
	mark: z.enum(PHOTO_MARKS)
});

/** 413: more than `MAX_PHOTO_BYTES`. */
export class PhotoTooLargeError extends AppError {
	constructor() {
		super(413, 'too_large', 'This photo is larger than 10 MB; take it again or choose a smaller one');
	}
}

const TYPES = [
	{ type: 'image/jpeg', ext: 'jpg', test: (b: Buffer) => b.length > 3 && b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff },
	{
		type: 'image/png',
		ext: 'png',
		test: (b: Buffer) => b.length > 8 && b.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))
	},
	{
		type: 'image/webp',
		ext: 'webp',
		test: (b: Buffer) => b.length > 12 && b.toString('latin1', 0, 4) === 'RIFF' && b.toString('latin1', 8, 12) === 'WEBP'
	}
];

/** The picture type by the file's first bytes (JPEG, PNG or WebP), or null. */
export function sniffImageType(bytes: Buffer): { type: string; ext: string } | null {
	const t = TYPES.find((x) => x.test(bytes));
	return t ? { type: t.type, ext: t.ext } : null;
}

const sha256Hex = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const objectKey = (workshopId: string, ext: string) =>
	`workshops/${workshopId}/photos/${randomBytes(24).toString('base64url')}.${ext}`;
const thumbKeyOf = (key: string) => key.replace(/\.[a-z]+$/, '-thumb.jpg');

async function photoRow(id: string, t?: Transaction): Promise<Record<string, unknown> | null> {
	const [row] = await db().query<Record<string, unknown>>('SELECT * FROM photos WHERE id = ?', {
		replacements: [id],
		type: QueryTypes.SELECT,
		transaction: t
	});
	return row ?? null;
}

/** The job's hybrid flag and assignee as the rulebook needs them; 404 when not seen. */
async function jobForAppend(actor: Actor, jobId: string, t?: Transaction) {
	const found = await jobWithVehicle(actor, jobId, t);
	const refusal = refuseAppend(
		actor,
		'photo',
		found ? { assigneeId: found.job.assigneeId, hybrid: found.hybrid } : undefined
	);
	if (refusal?.reason === 'not_found') throw new NotFoundError('Job');
	if (refusal) throw new ForbiddenError(refusal.message);
	return found!;
}

/** 400: the test or reading a photo was sent for is not of its job (or the reading not of its test). */
class WrongPlaceError extends AppError {
	constructor(field: 'testId' | 'readingId') {
		super(
			400,
			'wrong_place',
			field === 'readingId'
				? 'This photo was taken for a reading the workshop does not have on this job and test'
				: 'This photo was taken for a test the workshop does not have on this job'
		);
	}
}

/**
 * Where a photo hangs: its test must be one of its job's, its reading one of its job's
 * readings and of its test; returns the test (the reading's when none was sent).
 */
async function photoPlace(actor: Actor, f: { jobId: string; testId?: string | null; readingId?: string | null }) {
	const one = async (table: 'tests' | 'readings', id: string) => {
		const [row] = await db().query<{ job_id: string; test_id?: string }>(
			`SELECT job_id${table === 'readings' ? ', test_id' : ''} FROM ${table} WHERE workshop_id = ? AND id = ?`,
			{ replacements: [actor.workshopId, id], type: QueryTypes.SELECT }
		);
		return row ?? null;
	};
	if (f.readingId) {
		const r = await one('readings', f.readingId);
		if (!r || r.job_id !== f.jobId || (f.testId && r.test_id !== f.testId)) throw new WrongPlaceError('readingId');
		return r.test_id!;
	}
	if (f.testId) {
		const t = await one('tests', f.testId);
		if (!t || t.job_id !== f.jobId) throw new WrongPlaceError('testId');
	}
	return f.testId ?? null;
}

/** Store one uploaded photo (see the header); returns `{ photo, created }`. */
export async function uploadPhoto(
	actor: Actor,
	id: string,
	input: unknown,
	bytes: Buffer
): Promise<{ photo: Record<string, unknown>; created: boolean }> {
	if (!isUuidV7(id)) throw new ValidationError({ id: 'Expected a UUIDv7 made on the device' });
	const parsed = photoUploadFields.safeParse(input ?? {});
	if (!parsed.success) throw ValidationError.fromZod(parsed.error);
	const f = parsed.data;
	id = id.toLowerCase();
	const existing = await photoRow(id);
	if (existing) {
		if (existing.workshop_id !== actor.workshopId) throw new NotFoundError('Photo');
		await seenJob(actor, existing.job_id);
		if (existing.sha256 !== f.sha256) throw new IdConflictError();
		return { photo: appendRecord('photo', existing), created: false };
	}
	await jobForAppend(actor, f.jobId);
	const testId = await photoPlace(actor, f);
	if (bytes.length > MAX_PHOTO_BYTES) throw new PhotoTooLargeError();
	const kind = sniffImageType(bytes);
	if (!kind)
		throw new AppError(415, 'unsupported_type', 'This file is not a photo the workshop takes: send a JPEG, PNG or WebP picture');
	if (sha256Hex(bytes) !== f.sha256)
		throw new AppError(400, 'checksum_mismatch', 'The photo arrived damaged on the way; it will be sent again');
	let thumb: Buffer;
	let meta: { width?: number; height?: number };
	try {
		meta = await sharp(bytes).metadata();
		thumb = await sharp(bytes).rotate().resize(320, 320, { fit: 'inside' }).jpeg({ quality: 75 }).toBuffer();
	} catch {
		throw new AppError(400, 'unreadable_image', 'This picture cannot be opened; take it again');
	}
	const key = objectKey(actor.workshopId, kind.ext);
	const thumbKey = thumbKeyOf(key);
	await putObject(key, bytes, kind.type, f.sha256);
	await putObject(thumbKey, thumb, 'image/jpeg', sha256Hex(thumb));
	const stored = await headObject(key);
	if (!stored || stored.bytes !== bytes.length || (stored.sha256 && stored.sha256 !== f.sha256))
		throw new AppError(503, 'storage_unavailable', 'The photo store did not keep the photo; it will be sent again');
	const row = await db().transaction(async (t) => {
		// The job again, inside the transaction (it may have moved to someone else meanwhile).
		await jobForAppend(actor, f.jobId, t);
		const seq = await nextSeq(t, actor.workshopId);
		const opId = uuidv7();
		await rawQuery(
			t,
			`INSERT INTO photos (seq, workshop_id, id, op_id, created_by, device_id, device_time, job_id, test_id, reading_id,
				caption, content_type, bytes, sha256, width, height, object_key, thumb_key, created_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
			[
				seq,
				actor.workshopId,
				id,
				opId,
				actor.userId,
				actor.deviceId ?? 'web',
				sqlDateTime(f.deviceTime ? new Date(f.deviceTime) : new Date()),
				f.jobId,
				testId,
				f.readingId ?? null,
				f.caption || null,
				kind.type,
				bytes.length,
				f.sha256,
				meta.width ?? null,
				meta.height ?? null,
				key,
				thumbKey
			]
		);
		const audit = Object.entries({ jobId: f.jobId, testId, readingId: f.readingId ?? null, caption: f.caption ?? null, sha256: f.sha256 }).map(
			([field, v]) => ({ field, old: null, new: v })
		);
		await writeAudit(t, actor, 'photo', id, 'create', audit, opId);
		return photoRow(id, t);
	});
	return { photo: appendRecord('photo', row!), created: true };
}

/** A photo of the actor's workshop on a job the actor may open, not removed: 404 otherwise. */
async function visiblePhoto(actor: Actor, id: string) {
	if (!z.uuid().safeParse(id).success) throw new NotFoundError('Photo');
	const row = await photoRow(id.toLowerCase());
	if (!row || row.workshop_id !== actor.workshopId || row.purged_at) throw new NotFoundError('Photo');
	await seenJob(actor, row.job_id).catch(() => {
		throw new NotFoundError('Photo');
	});
	const marks = await markRows(actor.workshopId, [row.id as string]);
	if (photoStates(marks).get(row.id as string)?.removed) throw new NotFoundError('Photo');
	return row;
}

async function markRows(workshopId: string, photoIds: string[], t?: Transaction) {
	if (!photoIds.length) return [];
	const rows = await db().query<{ photo_id: string; mark: string; seq: number | bigint }>(
		'SELECT photo_id, mark, seq FROM photo_marks WHERE workshop_id = ? AND photo_id IN (?) ORDER BY seq',
		{ replacements: [workshopId, photoIds], type: QueryTypes.SELECT, transaction: t }
	);
	return rows.map((r) => ({ photoId: r.photo_id, mark: r.mark, order: Number(r.seq) }));
}

/** The bytes of a photo (`thumb` or `full`) and their type, for a member who may open its job. */
export async function photoFile(actor: Actor, id: string, size: 'thumb' | 'full') {
	const row = await visiblePhoto(actor, id);
	const body = await getObject(String(size === 'thumb' ? row.thumb_key : row.object_key));
	if (!body) throw new NotFoundError('Photo');
	return { body, type: size === 'thumb' ? 'image/jpeg' : String(row.content_type) };
}

/** Short-lived download addresses of a photo and its thumbnail. */
export async function photoLinks(actor: Actor, id: string) {
	const row = await visiblePhoto(actor, id);
	const seconds = urlSeconds();
	return {
		url: await downloadUrl(String(row.object_key), seconds),
		thumbUrl: await downloadUrl(String(row.thumb_key), seconds),
		expiresAt: new Date(Date.now() + seconds * 1000).toISOString()
	};
}

/** A photo as the pages list it. */
export type PhotoItem = {
	id: string;
	jobId: string;
	testId: string | null;
	readingId: string | null;
	caption: string | null;
	createdBy: string;
	createdAt: string;
	width: number | null;
	height: number | null;
	forCustomer: boolean;
};

/** The job's photos that are not removed, oldest first (404 when the actor may not open it). */
export async function jobPhotos(actor: Actor, jobId: string): Promise<PhotoItem[]> {
	await seenJob(actor, jobId);
	const rows = await db().query<Record<string, unknown>>(
		'SELECT * FROM photos WHERE workshop_id = ? AND job_id = ? AND purged_at IS NULL ORDER BY seq',
		{ replacements: [actor.workshopId, jobId], type: QueryTypes.SELECT }
	);
	const states = photoStates(await markRows(actor.workshopId, rows.map((r) => r.id as string)));
	return rows
		.filter((r) => !states.get(r.id as string)?.removed)
		.map((r) => ({
			id: String(r.id),
			jobId: String(r.job_id),
			testId: (r.test_id as string | null) ?? null,
			readingId: (r.reading_id as string | null) ?? null,
			caption: (r.caption as string | null) ?? null,
			createdBy: String(r.created_by),
			createdAt: new Date(r.created_at as string).toISOString(),
			width: (r.width as number | null) ?? null,
			height: (r.height as number | null) ?? null,
			forCustomer: states.get(r.id as string)?.forCustomer ?? false
		}));
}

/**
 * What a mark needs to know of its photo (sync's append path and the desk): the stored
 * photos of the workshop among `ids`, with their job and author.
 */
export async function photoFacts(actor: Actor, ids: string[], t?: Transaction) {
	if (!ids.length) return new Map<string, { jobId: string; createdBy: string; testId: string | null }>();
	const rows = await db().query<{ id: string; job_id: string; created_by: string; test_id: string | null }>(
		'SELECT id, job_id, created_by, test_id FROM photos WHERE workshop_id = ? AND id IN (?)',
		{ replacements: [actor.workshopId, ids], type: QueryTypes.SELECT, transaction: t }
	);
	return new Map(rows.map((r) => [r.id, { jobId: r.job_id, createdBy: r.created_by, testId: r.test_id }]));
}

/** Mark a photo from the desk (`{ mark }`): removed, for the customer or not. */
export async function markPhoto(actor: Actor, photoId: string, input: unknown, o: { transaction?: Transaction } = {}) {
	const parsed = photoMarkFields.safeParse({ ...((input as object) ?? {}), photoId });
	if (!parsed.success) throw ValidationError.fromZod(parsed.error);
	const { mark } = parsed.data as { photoId: string; mark: PhotoMark };
	return inTransaction(o.transaction, async (t) => {
		const photo = (await photoFacts(actor, [parsed.data.photoId], t)).get(parsed.data.photoId);
		if (!photo) throw new NotFoundError('Photo');
		const found = await jobWithVehicle(actor, photo.jobId, t);
		const refusal = refuseAppend(actor, 'photo_mark', found ? { assigneeId: found.job.assigneeId, hybrid: false } : undefined);
		if (refusal) throw new NotFoundError('Photo');
		const why = refusePhotoMark(actor, photo, mark);
		if (why) throw new ForbiddenError(why);
		const [id, opId] = [uuidv7(), uuidv7()];
		const seq = await nextSeq(t, actor.workshopId);
		await rawQuery(
			t,
			`INSERT INTO photo_marks (seq, workshop_id, id, op_id, created_by, device_id, device_time, job_id, test_id, photo_id, mark, created_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
			[seq, actor.workshopId, id, opId, actor.userId, actor.deviceId ?? 'web', sqlDateTime(new Date()), photo.jobId, photo.testId, parsed.data.photoId, mark]
		);
		await writeAudit(t, actor, 'photo_mark', id, 'create', [{ field: 'mark', old: null, new: mark }], opId);
		const [row] = await db().query<Record<string, unknown>>('SELECT * FROM photo_marks WHERE id = ?', {
			replacements: [id],
			type: QueryTypes.SELECT,
			transaction: t
		});
		return appendRecord('photo_mark', row);
	});
}

/**
 * The job's photos chosen for the customer, for the report: the thumbnail's bytes inline
 * (`src` a data address, so the customer's page needs no sign-in), the caption or "Photo N".
 */
export async function customerPhotos(actor: Actor, jobId: string): Promise<ReportPhoto[]> {
	const list = (await jobPhotos(actor, jobId)).filter((p) => p.forCustomer);
	const out: ReportPhoto[] = [];
	for (const [i, p] of list.entries()) {
		const { body } = await photoFile(actor, p.id, 'thumb').catch(() => ({ body: null }));
		if (!body) continue;
		out.push({
			id: p.id,
			caption: p.caption || `Photo ${i + 1}`,
			src: `data:image/jpeg;base64,${body.toString('base64')}`,
			...(p.width && p.height ? { width: p.width, height: p.height } : {})
		});
	}
	return out;
}

/** The longest side of a photo printed in the customer's PDF (px): 80 mm wide at about 380 dpi. */
export const PRINT_PX = 1200;
/** JPEG quality of a printed photo: sharp on paper, about 150–300 kB each. */
export const PRINT_QUALITY = 80;

/**
 * A photo of the workshop `workshopId` at print size for the customer's PDF, made at PDF time
 * with sharp from the original in the photo store: upright, at most `PRINT_PX` on its longest
 * side (never enlarged), JPEG at `PRINT_QUALITY`. Null when the photo is gone (removed, purged,
 * another workshop's, or its object missing) or cannot be read: the caller falls back to the
 * thumbnail the report carries.
 */
export async function printPhoto(workshopId: string, photoId: string): Promise<Buffer | null> {
	if (!z.uuid().safeParse(photoId).success) return null;
	const row = await photoRow(photoId.toLowerCase());
	if (!row || row.workshop_id !== workshopId || row.purged_at) return null;
	const marks = await markRows(workshopId, [row.id as string]);
	if (photoStates(marks).get(row.id as string)?.removed) return null;
	const original = await getObject(String(row.object_key)).catch(() => null);
	if (!original) return null;
	return sharp(original)
		.rotate()
		.resize(PRINT_PX, PRINT_PX, { fit: 'inside', withoutEnlargement: true })
		.jpeg({ quality: PRINT_QUALITY })
		.toBuffer()
		.catch(() => null);
}

/**
 * Delete from storage the objects of photos removed more than `days` days before `now`, and
 * mark their rows purged; returns how many photos were purged.
 */
export async function purgeRemovedPhotos(now = new Date(), days = PURGE_DAYS): Promise<number> {
	const before = new Date(now.getTime() - days * 86_400_000);
	const rows = await db().query<{ id: string; object_key: string; thumb_key: string }>(
		`SELECT p.id, p.object_key, p.thumb_key FROM photos p
		 WHERE p.purged_at IS NULL AND EXISTS (
			SELECT 1 FROM photo_marks m WHERE m.photo_id = p.id AND m.workshop_id = p.workshop_id
				AND m.mark = 'removed' AND m.created_at < ?)
		 LIMIT 500`,
		{ replacements: [sqlDateTime(before)], type: QueryTypes.SELECT }
	);
	for (const r of rows) {
		await deleteObjects([r.object_key, r.thumb_key]);
		await db().query('UPDATE photos SET purged_at = UTC_TIMESTAMP(3) WHERE id = ?', { replacements: [r.id], type: QueryTypes.UPDATE });
	}
	return rows.length;
}

let cleanupTimer: ReturnType<typeof setInterval> | null = null;

/**
 * Run `purgeRemovedPhotos` in this process every `PHOTO_CLEANUP_MS` (an hour by default),
 * when a photo store is configured. Several processes may run it at once: deleting an object
 * twice is harmless, and each row is marked once.
 */
export function startPhotoCleanup() {
	if (cleanupTimer || !process.env.S3_BUCKET) return;
	const every = Number(process.env.PHOTO_CLEANUP_MS) || 3_600_000;
	cleanupTimer = setInterval(() => {
		purgeRemovedPhotos().catch((e) => console.error('photo cleanup:', (e as Error).message));
	}, every);
	cleanupTimer.unref();
}

export function stopPhotoCleanup() {
	if (cleanupTimer) clearInterval(cleanupTimer);
	cleanupTimer = null;
}
