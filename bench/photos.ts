/**
 * Photo upload benchmark: `npm run bench:photos` (not part of `npm test`).
 *
 *  1. MariaDB up (the private server of this checkout; reused when it already runs), a fresh
 *     database `fieldbench_bench_photos`, migrations, a build when the sources changed, the
 *     local fake photo store (its own, `.data/s3/bench-photos/`, removed at the end) and the
 *     app served as `npm start` serves it, on a free port.
 *  2. An invented workshop, a lead and a job (through the services); the lead signs in.
 *  3. 50 invented photos of about 2 MB each (random noise as JPEG, so they do not compress),
 *     made before timing.
 *  4. Through the app's path: each photo `PUT /api/photos/:id` as the phone sends it (two at
 *     a time, as the phone's queue does): session, size, type by content, SHA-256, the
 *     thumbnail, the object and the thumbnail stored, read back, the record and the feed.
 *  5. Straight to the fake: the same 50 objects with the SDK's PutObject, two at a time.
 *  6. Prints both wall times, MB/s and the ratio app / direct (one run). Counts are checked
 *     (50 records, 100 objects through the app, 50 directly); exit code 1 when one fails.
 *
 * Knobs (environment): BENCH_PHOTOS (50), BENCH_PHOTO_MB (about 2), BENCH_PARALLEL (2).
 */
import { createHash, randomBytes } from 'node:crypto';
import { PutObjectCommand } from '@aws-sdk/client-s3';
import { QueryTypes } from 'sequelize';
import sharp from 'sharp';
import { v7 as uuidv7 } from 'uuid';
import { buildIfNeeded, freePort, serve, stopServe } from '../scripts/lib/app';
import { dropDatabase, startServer, stopServer } from '../scripts/lib/mariadb';
import { s3Env, startS3Server, stopS3Server } from '../scripts/lib/s3';
import { freshBenchDatabase } from './lib/setup';
import { Client } from '../tests/helpers/http';

const DB_NAME = 'fieldbench_bench_photos';
const PHOTOS = Number(process.env.BENCH_PHOTOS ?? 50);
const MB = Number(process.env.BENCH_PHOTO_MB ?? 2);
const PARALLEL = Math.max(1, Number(process.env.BENCH_PARALLEL ?? 2));
const PASSWORD = 'bench-password-2026';
const S3_NAME = 'bench-photos';

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

/** An invented photo of about `MB` megabytes: noise, which JPEG cannot shrink much. */
async function noisePhoto(): Promise<Buffer> {
	// About 0.62 byte per pixel at quality 80 for noise (measured here); aim for MB.
	const pixels = (MB * 1024 * 1024) / 0.62;
	const width = Math.round(Math.sqrt((pixels * 4) / 3));
	const height = Math.round((width * 3) / 4);
	return sharp(randomBytes(width * height * 3), { raw: { width, height, channels: 3 } }).jpeg({ quality: 80 }).toBuffer();
}

async function inParallel<T>(items: T[], fn: (item: T) => Promise<void>) {
	const queue = [...items];
	await Promise.all(Array.from({ length: PARALLEL }, async () => {
		while (queue.length) await fn(queue.shift()!);
	}));
}

const { port: dbPort, started } = await startServer();
const env = await freshBenchDatabase(dbPort, DB_NAME);
buildIfNeeded();
const store = await startS3Server(S3_NAME);
Object.assign(process.env, s3Env(store.port));
const app = await serve(await freePort(4700), { ...env, ...s3Env(store.port) }, 'ignore');
let failed = false;
try {
	const { createUser, createWorkshop } = await import('../src/lib/server/services/workshops');
	const { jobs } = await import('../src/lib/server/services/jobs');
	const { db, closeDb } = await import('../src/lib/server/db');
	const { s3, photoBucket } = await import('../src/lib/server/photos/storage');
	const w = await createWorkshop(`Bench photos ${uuidv7().slice(-6)}`);
	const email = `lead-${uuidv7().slice(-8)}@bench.example`;
	const lead = await createUser(w.id, { email, name: 'Bench Lead', role: 'lead', password: PASSWORD });
	const job = await jobs.create({ userId: lead.id, workshopId: w.id, role: 'lead', deviceId: 'bench' }, { complaint: 'Invented job for the photo benchmark' });
	const c = new Client(app.url, '10.99.0.1');
	if ((await c.signIn(email, PASSWORD)).status !== 303) throw new Error('sign-in failed');

	console.log(`Making ${PHOTOS} photos of about ${MB} MB…`);
	const photos = await Promise.all(Array.from({ length: PHOTOS }, noisePhoto));
	const total = photos.reduce((n, p) => n + p.length, 0);
	console.log(`${PHOTOS} photos, ${(total / 1048576).toFixed(1)} MB in all (mean ${(total / PHOTOS / 1048576).toFixed(2)} MB)`);

	let t0 = performance.now();
	let ok = 0;
	await inParallel(photos, async (p) => {
		const q = new URLSearchParams({ jobId: job.id as string, sha256: sha(p) });
		const r = await fetch(`${app.url}/api/photos/${uuidv7()}?${q}`, { method: 'PUT', headers: c.headers({ 'content-type': 'image/jpeg' }), body: new Uint8Array(p) });
		await r.arrayBuffer();
		if (r.status === 201) ok++;
		else console.error('upload answered', r.status);
	});
	const appMs = performance.now() - t0;

	t0 = performance.now();
	let direct = 0;
	await inParallel(photos, async (p) => {
		await s3().send(new PutObjectCommand({ Bucket: photoBucket()!, Key: `bench/${randomBytes(24).toString('base64url')}.jpg`, Body: p, ContentType: 'image/jpeg', ContentLength: p.length }));
		direct++;
	});
	const directMs = performance.now() - t0;

	const [{ n }] = await db().query<{ n: number | bigint }>('SELECT COUNT(*) AS n FROM photos WHERE workshop_id = ?', { replacements: [w.id], type: QueryTypes.SELECT });
	await closeDb();
	failed = ok !== PHOTOS || Number(n) !== PHOTOS || direct !== PHOTOS;
	const rate = (ms: number) => (total / 1048576 / (ms / 1000)).toFixed(1);
	console.log(`through the app (PUT /api/photos/:id, ${PARALLEL} at a time): ${(appMs / 1000).toFixed(2)} s, ${rate(appMs)} MB/s, ${(appMs / PHOTOS).toFixed(0)} ms per photo`);
	console.log(`straight to the fake (SDK PutObject, ${PARALLEL} at a time): ${(directMs / 1000).toFixed(2)} s, ${rate(directMs)} MB/s, ${(directMs / PHOTOS).toFixed(0)} ms per photo`);
	console.log(`ratio app / direct: ${(appMs / directMs).toFixed(2)}`);
	console.log(`checks: ${ok}/${PHOTOS} uploads accepted, ${n} records, ${direct}/${PHOTOS} direct puts${failed ? ' — FAILED' : ''}`);
} finally {
	stopServe(app.child);
	await stopS3Server(S3_NAME, true);
	dropDatabase(DB_NAME);
	if (started) await stopServer();
}
process.exit(failed ? 1 : 0);
