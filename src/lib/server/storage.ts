/**
 * Object storage for attachments over the S3 API: any S3-compatible store in production, the
 * local fake (scripts/s3-fake.ts, s3rver) in development and tests. Settings come from the
 * environment (see README, "Environment"); the client is made on first use.
 */
import {
	DeleteObjectCommand,
	GetObjectCommand,
	NoSuchKey,
	PutObjectCommand,
	S3Client,
	S3ServiceException
} from '@aws-sdk/client-s3';
import { config, parseConfig, type Env, type StorageSettings } from './config';

export type { StorageSettings } from './config';

/** Where objects go: from the configuration (or from `env`, checked the same way). */
export function storageSettings(env?: Env): StorageSettings {
	return (env ? parseConfig(env) : config()).storage;
}

let client: S3Client | undefined;
let settings: StorageSettings | undefined;

function s3(): { client: S3Client; bucket: string } {
	if (!client || !settings) {
		settings = storageSettings();
		client = new S3Client({
			endpoint: settings.endpoint,
			region: settings.region,
			forcePathStyle: settings.forcePathStyle,
			credentials:
				settings.accessKeyId && settings.secretAccessKey
					? { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey }
					: undefined,
			// Checksums only where the API demands them: with the SDK's default, stream uploads are
			// framed with trailing checksums that s3rver stores as part of the object.
			requestChecksumCalculation: 'WHEN_REQUIRED',
			responseChecksumValidation: 'WHEN_REQUIRED'
		});
	}
	return { client, bucket: settings.bucket };
}

/** Forgets the client, so the next call reads the environment again (tests change it). */
export function resetStorageClient(): void {
	client?.destroy();
	client = undefined;
	settings = undefined;
}

/** Stores `bytes` under `key` exactly as given. */
export async function putObject(
	key: string,
	bytes: Uint8Array,
	contentType: string
): Promise<void> {
	const { client, bucket } = s3();
	await client.send(
		new PutObjectCommand({
			Bucket: bucket,
			Key: key,
			Body: bytes,
			ContentType: contentType,
			ContentLength: bytes.byteLength
		})
	);
}

/** The object's bytes, or null when there is no such object. */
export async function getObject(key: string): Promise<Uint8Array | null> {
	const { client, bucket } = s3();
	try {
		const out = await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }));
		return out.Body ? await out.Body.transformToByteArray() : new Uint8Array();
	} catch (err) {
		if (err instanceof NoSuchKey) return null;
		if (err instanceof S3ServiceException && err.$metadata.httpStatusCode === 404) return null;
		throw err;
	}
}

/** Removes an object; a missing one is not an error. */
export async function deleteObject(key: string): Promise<void> {
	const { client, bucket } = s3();
	await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: key }));
}
