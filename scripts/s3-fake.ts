/**
 * A local S3-compatible server for development and tests (s3rver): listens on the loopback
 * address of S3_ENDPOINT, keeps objects in S3_FAKE_DIR, and creates S3_BUCKET on start. Not for
 * real data: a real shop points S3_ENDPOINT at its own store and `npm start` starts no fake.
 */
import { mkdirSync } from 'node:fs';
import { resolve } from 'node:path';
import S3rver from 's3rver';

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '[::1]']);

const endpoint = new URL(process.env.S3_ENDPOINT || 'http://127.0.0.1:4569');
const bucket = process.env.S3_BUCKET || 'nestmark-attachments';
const directory = resolve(process.env.S3_FAKE_DIR || '.data/s3');
const port = Number(endpoint.port || 80);

if (!LOOPBACK.has(endpoint.hostname)) {
	console.error(`s3-fake: S3_ENDPOINT must be a loopback address, not ${endpoint.hostname}`);
	process.exit(1);
}
mkdirSync(directory, { recursive: true });

const server = new S3rver({
	address:
		endpoint.hostname === 'localhost' ? '127.0.0.1' : endpoint.hostname.replace(/[[\]]/g, ''),
	port,
	directory,
	silent: true,
	configureBuckets: [{ name: bucket, configs: [] }]
});

server.run().then(
	(address) => {
		console.log(
			`s3-fake: listening on ${address.address}:${address.port}, bucket ${bucket}, data in ${directory}`
		);
	},
	(err: NodeJS.ErrnoException) => {
		console.error(`s3-fake: cannot listen on ${endpoint.host}: ${err.code ?? err.message}`);
		process.exit(1);
	}
);

function shutdown(): void {
	server.close().then(
		() => process.exit(0),
		() => process.exit(0)
	);
	setTimeout(() => process.exit(0), 2000).unref();
}
process.on('SIGTERM', shutdown);
process.on('SIGINT', shutdown);
