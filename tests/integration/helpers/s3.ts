/**
 * The S3 API for integration tests: the real s3rver, never a mock. `npm test` starts the fake
 * (scripts/s3-fake.ts) and exports S3_ENDPOINT before vitest runs; run by hand without it, the
 * tests start their own s3rver on a free loopback port with its data in a temporary folder.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import S3rver from 's3rver';
import { resetStorageClient } from '$lib/server/storage';

/** Makes sure an S3 endpoint answers; returns the function that stops what was started here. */
export async function useS3(): Promise<() => Promise<void>> {
	process.env.S3_BUCKET ??= 'nestmark-attachments';
	if (process.env.S3_ENDPOINT) {
		resetStorageClient();
		return async () => resetStorageClient();
	}
	const directory = mkdtempSync(join(tmpdir(), 'nestmark-s3-'));
	const server = new S3rver({
		address: '127.0.0.1',
		port: 0,
		directory,
		silent: true,
		configureBuckets: [{ name: process.env.S3_BUCKET, configs: [] }]
	});
	const address = await server.run();
	Object.assign(process.env, {
		S3_ENDPOINT: `http://127.0.0.1:${address.port}`,
		S3_ACCESS_KEY_ID: 'S3RVER',
		S3_SECRET_ACCESS_KEY: 'S3RVER',
		S3_FORCE_PATH_STYLE: 'true'
	});
	resetStorageClient();
	return async () => {
		resetStorageClient();
		await server.close();
		delete process.env.S3_ENDPOINT;
		rmSync(directory, { recursive: true, force: true });
	};
}
