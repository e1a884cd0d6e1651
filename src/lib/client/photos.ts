/**
 * Photos on the phone: taken with no signal, kept in IndexedDB (`photos` store), sent when
 * the connection returns.
 *
 * - `roomForPhoto` asks the browser's storage estimate BEFORE the camera opens, so a full
 *   phone is said before the photo is taken, not after.
 * - `addPhoto` shrinks the picture in the browser (longest side 1,600 px, JPEG: drawn on a
 *   canvas after `createImageBitmap` turned it upright, so the orientation is kept and the
 *   file's metadata — location included — is not carried over), computes its SHA-256 and
 *   keeps it with its record, in one write.
 * - `PhotoUploads` sends waiting photos one or two at a time (`PUT /api/photos/:id`, with
 *   progress): a failure (no connection, a damaged arrival, a busy server) leaves the photo
 *   waiting for the next round (the sync runner's back-off); 401 pauses every upload until
 *   sign-in (nothing is dropped); a refusal by the workshop (too large, not a picture) keeps
 *   the photo on the phone with the reason.
 * - `jobPhotoList` is what the job page shows: this phone's photos (from their blobs, so they
 *   show offline) and the job's photos from the workshop (`photo` records from the pull),
 *   less the removed ones; `readingPhotoList` the ones of one reading (shown beside it on the
 *   test screen).
 */
import { v7 as uuidv7 } from 'uuid';
import { photoStates, PHOTO_LONG_SIDE } from '../photos/marks';
import { fitWithin, refuseForStorage, uploadProblemWords } from '../photos/shrink';
import type { LocalDb, LocalPhoto } from './local-db';
import { writeLocal } from './outbox';
import { syncStatus } from './status.svelte';

/** Null when there is room for a photo, else why not (in words). */
export async function roomForPhoto(): Promise<string | null> {
	try {
		return refuseForStorage((await navigator.storage?.estimate?.()) ?? null);
	} catch {
		return null;
	}
}

/** The picture at most `PHOTO_LONG_SIDE` px on its longest side, upright, as a JPEG without metadata. */
export async function shrinkPhoto(file: Blob): Promise<{ blob: Blob; width: number; height: number }> {
	const bitmap = await createImageBitmap(file, { imageOrientation: 'from-image' });
	const { width, height } = fitWithin(bitmap.width, bitmap.height, PHOTO_LONG_SIDE);
	const canvas = document.createElement('canvas');
	canvas.width = width;
	canvas.height = height;
	canvas.getContext('2d')!.drawImage(bitmap, 0, 0, width, height);
	bitmap.close();
	const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/jpeg', 0.85));
	if (!blob) throw new Error('The picture could not be shrunk');
	return { blob, width, height };
}

export async function sha256Hex(blob: Blob): Promise<string> {
	const digest = await crypto.subtle.digest('SHA-256', await blob.arrayBuffer());
	return [...new Uint8Array(digest)].map((b) => b.toString(16).padStart(2, '0')).join('');
}

/** Keep a new photo of the job (and test or reading) on the phone; returns it. */
export async function addPhoto(
	db: LocalDb,
	where: { jobId: string; testId?: string | null; readingId?: string | null; caption?: string | null },
	file: Blob
): Promise<LocalPhoto> {
	const { blob, width, height } = await shrinkPhoto(file);
	const photo: LocalPhoto = {
		id: uuidv7(),
		jobId: where.jobId,
		testId: where.testId ?? null,
		readingId: where.readingId ?? null,
		caption: where.caption?.trim() || null,
		blob,
		type: 'image/jpeg',
		bytes: blob.size,
		width,
		height,
		sha256: await sha256Hex(blob),
		state: 'waiting',
		attempts: 0,
		createdAt: new Date().toISOString()
	};
	await db.put('photos', photo);
	await countPhotos(db);
	return photo;
}

/** Photos waiting to send (the sync badge counts them). */
export async function countPhotos(db: LocalDb): Promise<number> {
	const n = await db.countFromIndex('photos', 'by-state', 'waiting');
	syncStatus.photosWaiting = n;
	return n;
}

/**
 * Remove a photo: one not sent yet is simply dropped from the phone; a sent one gets a
 * "removed" mark through sync (the workshop keeps it hidden and deletes it after 30 days).
 */
export async function removePhoto(db: LocalDb, photo: { id: string; jobId: string }) {
	const mine = await db.get('photos', photo.id);
	if (mine && mine.state !== 'sent') {
		await db.delete('photos', photo.id);
		await countPhotos(db);
		return;
	}
	await writeLocal(db, { entity: 'photo_mark', kind: 'create', jobId: photo.jobId, fields: { photoId: photo.id, mark: 'removed' } });
}

/** A photo as the job page draws it. */
export type PhotoView = {
	id: string;
	jobId: string;
	testId: string | null;
	readingId: string | null;
	caption: string | null;
	/** Where the thumbnail comes from (a blob address on this phone, else the workshop). */
	thumb: string;
	full: string;
	state: 'waiting' | 'sending' | 'sent' | 'refused';
	problem?: string;
	mine: boolean;
	createdBy?: string;
};

const blobUrls = new Map<string, string>();
const blobUrl = (p: LocalPhoto) => {
	let u = blobUrls.get(p.id);
	if (!u) blobUrls.set(p.id, (u = URL.createObjectURL(p.blob)));
	return u;
};

/** The job's photos, oldest first, without the removed ones. */
export async function jobPhotoList(db: LocalDb, jobId: string): Promise<PhotoView[]> {
	const [local, records] = await Promise.all([
		db.getAllFromIndex('photos', 'by-job', jobId),
		db.getAllFromIndex('records', 'by-job', jobId)
	]);
	const marks = records.filter((r) => r.entity === 'photo_mark').map((r) => ({ photoId: String(r.data.photoId), mark: String(r.data.mark) }));
	const states = photoStates(marks);
	const out: PhotoView[] = local.map((p) => ({
		id: p.id,
		jobId,
		testId: p.testId,
		readingId: p.readingId ?? null,
		caption: p.caption,
		thumb: blobUrl(p),
		full: blobUrl(p),
		state: p.state === 'waiting' && uploads.sending.has(p.id) ? 'sending' : p.state,
		problem: p.problem,
		mine: true
	}));
	const seen = new Set(out.map((p) => p.id));
	for (const r of records) {
		if (r.entity !== 'photo' || seen.has(r.id)) continue;
		out.push({
			id: r.id,
			jobId,
			testId: (r.data.testId as string | null) ?? null,
			readingId: (r.data.readingId as string | null) ?? null,
			caption: (r.data.caption as string | null) ?? null,
			thumb: `/api/photos/${r.id}/file`,
			full: `/api/photos/${r.id}/file?size=full`,
			state: 'sent',
			mine: false,
			createdBy: r.data.createdBy as string | undefined
		});
	}
	return out.filter((p) => !states.get(p.id)?.removed).sort((a, b) => (a.id < b.id ? -1 : 1));
}

/** The photos of one reading of the job, oldest first, without the removed ones. */
export async function readingPhotoList(db: LocalDb, jobId: string, readingId: string): Promise<PhotoView[]> {
	return (await jobPhotoList(db, jobId)).filter((p) => p.readingId === readingId);
}

type Outcome = 'sent' | 'retry' | 'signed_out' | 'refused';

/** One upload with progress (XMLHttpRequest: fetch reports no upload progress). */
function send(p: LocalPhoto, onProgress: (fraction: number) => void): Promise<{ status: number; code?: string }> {
	return new Promise((resolve) => {
		const q = new URLSearchParams({ jobId: p.jobId, sha256: p.sha256, deviceTime: p.createdAt });
		if (p.testId) q.set('testId', p.testId);
		if (p.readingId) q.set('readingId', p.readingId);
		if (p.caption) q.set('caption', p.caption);
		const xhr = new XMLHttpRequest();
		xhr.open('PUT', `/api/photos/${p.id}?${q}`);
		xhr.setRequestHeader('content-type', p.type);
		xhr.setRequestHeader('accept', 'application/json');
		const device = localStorage.getItem('fieldbench:device');
		if (device) xhr.setRequestHeader('x-device-id', device);
		xhr.timeout = 120_000;
		xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
		xhr.onload = () => {
			let code: string | undefined;
			try {
				code = JSON.parse(xhr.responseText)?.error?.code;
			} catch {
				/* not JSON */
			}
			resolve({ status: xhr.status, code });
		};
		xhr.onerror = xhr.ontimeout = xhr.onabort = () => resolve({ status: 0 });
		xhr.send(p.blob);
	});
}

/** The upload queue (one per page; `run` is called by the sync runner). */
class PhotoUploads {
	/** Ids being sent now, with their progress (0–1). */
	sending = new Map<string, number>();
	private running = false;
	/** Uploads at once. */
	concurrency = 2;
	/** Called when a photo's state or progress changes (the page redraws). */
	listeners = new Set<() => void>();

	private changed() {
		for (const l of this.listeners) l();
	}

	/** Send what is waiting; resolves when done, paused (signed out) or stopped by a failure. */
	async run(db: LocalDb): Promise<void> {
		if (this.running || !navigator.onLine) return;
		this.running = true;
		try {
			const waiting = (await db.getAllFromIndex('photos', 'by-state', 'waiting')).sort((a, b) => (a.id < b.id ? -1 : 1));
			let stop = false;
			const worker = async () => {
				while (!stop && waiting.length) {
					const p = waiting.shift()!;
					const outcome = await this.one(db, p);
					if (outcome === 'signed_out' || outcome === 'retry') stop = true;
				}
			};
			await Promise.all(Array.from({ length: this.concurrency }, worker));
		} finally {
			this.running = false;
			await countPhotos(db);
			this.changed();
		}
	}

	private async one(db: LocalDb, p: LocalPhoto): Promise<Outcome> {
		this.sending.set(p.id, 0);
		this.changed();
		const r = await send(p, (f) => {
			this.sending.set(p.id, f);
			this.changed();
		});
		this.sending.delete(p.id);
		const current = await db.get('photos', p.id);
		if (!current) return 'sent'; // removed meanwhile
		let outcome: Outcome;
		if (r.status === 200 || r.status === 201) {
			current.state = 'sent';
			outcome = 'sent';
		} else if (r.status === 401) {
			syncStatus.state = 'signed_out';
			outcome = 'signed_out';
		} else if (r.status === 0 || r.status >= 500 || r.status === 429 || r.code === 'checksum_mismatch') {
			current.attempts += 1;
			outcome = 'retry';
		} else {
			current.state = 'refused';
			current.problem = uploadProblemWords(r.status, r.code);
			outcome = 'refused';
		}
		await db.put('photos', current);
		await countPhotos(db);
		this.changed();
		return outcome;
	}
}

export const uploads = new PhotoUploads();
