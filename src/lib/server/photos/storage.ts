/**
 * The photo store: S3-compatible object storage through the AWS SDK, configured only by the
 * environment, so a hosted service works unchanged (`npm start` and the tests point it at
 * the local fake, `scripts/lib/s3.ts`):
 *
 * | variable | meaning |
 * |---|---|
 * | `S3_ENDPOINT` | the service's address; unset: the provider's own (AWS) |
 * | `S3_REGION` | its region (default `us-east-1`) |
 * | `S3_BUCKET` | the bucket that holds every workshop's photos |
 * | `S3_ACCESS_KEY_ID`, `S3_SECRET_ACCESS_KEY` | the keys |
 * | `S3_FORCE_PATH_STYLE` | `true` for `endpoint/bucket/key` addresses (default when `S3_ENDPOINT` is set) |
 * | `PHOTO_URL_SECONDS` | how long a download address works (default 300) |
 */
import {
	DeleteObjectCommand,
	GetObjectCommand,
	HeadObjectCommand,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';

let client: S3Client | null = null;
let clientKey = '';

/** The bucket, or null when no photo store is configured. */
export function photoBucket(): string | null {
	return process.env.S3_BUCKET || null;
}

/** The configured client (one per process; rebuilt when the environment changes). */
export function s3(): S3Client {
	const e = process.env;
	const key = [e.S3_ENDPOINT, e.S3_REGION, e.S3_ACCESS_KEY_ID, e.S3_FORCE_PATH_STYLE].join('|');
	if (client && key === clientKey) return client;
	// The pinned SDK runs on Node 20; its notice that later versions will need Node 22 would
	// be the app's only output (the app prints nothing). Upgrading the SDK past January 2027
	// means Node 22 first.
	e.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';
	client = new S3Client({
		endpoint: e.S3_ENDPOINT || undefined,
		region: e.S3_REGION || 'us-east-1',
		forcePathStyle: e.S3_FORCE_PATH_STYLE ? e.S3_FORCE_PATH_STYLE === 'true' : Boolean(e.S3_ENDPOINT),
		credentials:
			e.S3_ACCESS_KEY_ID && e.S3_SECRET_ACCESS_KEY
				? { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY }
				: undefined,
		// Checksums only when the operation needs one (S3-compatible services differ here).
		requestChecksumCalculation: 'WHEN_REQUIRED',
		responseChecksumValidation: 'WHEN_REQUIRED'
	});
	clientKey = key;
	return client;
}

/** How long a download address works, in seconds. */
export const urlSeconds = () => Math.max(1, Number(process.env.PHOTO_URL_SECONDS) || 300);

function bucket(): string {
	const b = photoBucket();
	if (!b) throw new Error('No photo store: set S3_BUCKET (see DEVELOPERS.md)');
	return b;
}

export async function putObject(key: string, body: Buffer, contentType: string, sha256: string) {
	await s3().send(
		new PutObjectCommand({
			Bucket: bucket(),
			Key: key,
			Body: body,
			ContentType: contentType,
			ContentLength: body.length,
			Metadata: { sha256 }
		})
	);
}

/** The stored object's size and recorded SHA-256, or null when it is not there. */
export async function headObject(key: string): Promise<{ bytes: number; sha256: string | null } | null> {
	try {
		const r = await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
		return { bytes: Number(r.ContentLength ?? 0), sha256: r.Metadata?.sha256 ?? null };
	} catch (e) {
		const status = (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
		if (status === 404 || (e as Error).name === 'NotFound' || (e as Error).name === 'NoSuchKey') return null;
		throw e;
	}
}

/** The object's bytes, or null when it is gone. */
export async function getObject(key: string): Promise<Buffer | null> {
	try {
		const r = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
		return Buffer.from(await r.Body!.transformToByteArray());
	} catch (e) {
		if ((e as Error).name === 'NoSuchKey' || (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404) return null;
		throw e;
	}
}

export async function deleteObjects(keys: string[]) {
	// One by one: a multi-delete needs a body checksum that not every S3-compatible service reads.
	for (const Key of keys) await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key }));
}

/** A short-lived download address of the object (`urlSeconds()` unless given). */
export function downloadUrl(key: string, seconds = urlSeconds()): Promise<string> {
	return getSignedUrl(s3(), new GetObjectCommand({ Bucket: bucket(), Key: key }), { expiresIn: seconds });
}
