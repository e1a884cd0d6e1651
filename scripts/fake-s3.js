/**
 * The local fake photo store (development, demo and tests only): an S3-compatible server on
 * 127.0.0.1 (s3rver) keeping its objects as files in the folder given, with the bucket
 * created. Nothing leaves the machine. Started and stopped by scripts/lib/s3.ts, like the
 * private MariaDB. Its keys are s3rver's fixed pair, S3RVER / S3RVER.
 *
 *   node scripts/fake-s3.js --port 4569 --dir .data/s3 --bucket fieldbench-photos
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import S3rver from 's3rver';

const arg = (name, fallback) => {
	const i = process.argv.indexOf(`--${name}`);
	return i > 0 ? process.argv[i + 1] : fallback;
};
const port = Number(arg('port', '4569'));
const dir = path.resolve(arg('dir', '.data/s3'));
const bucket = arg('bucket', 'fieldbench-photos');
mkdirSync(dir, { recursive: true });

const server = new S3rver({
	port,
	address: '127.0.0.1',
	silent: true,
	directory: dir,
	configureBuckets: [{ name: bucket }]
});
await server.run();
for (const sig of ['SIGINT', 'SIGTERM']) {
	process.on(sig, async () => {
		await server.close();
		process.exit(0);
	});
}
