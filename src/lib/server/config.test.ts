import { describe, expect, it } from 'vitest';
import { ConfigError, configure, parseConfig } from './config';

function problems(env: Record<string, string>): string[] {
	try {
		parseConfig(env);
	} catch (e) {
		if (e instanceof ConfigError) return e.problems;
		throw e;
	}
	return [];
}

describe('parseConfig', () => {
	it('takes the defaults of a production installation when nothing is set', () => {
		const c = parseConfig({});
		expect(c.environment).toBe('production');
		expect(c.lenient).toBe(false);
		expect(c.nestingGuard).toBe(false);
		expect(c.pool).toEqual({ size: 10, queueLimit: 100, acquireTimeoutMs: 5000 });
		expect(c.dueScanIntervalMs).toBe(15 * 60_000);
		expect(c.smtp).toMatchObject({ host: '127.0.0.1', port: 2525, secure: false });
		// Production never falls back to the local S3 fake or its key pair.
		expect(c.storage).toMatchObject({
			endpoint: undefined,
			accessKeyId: '',
			forcePathStyle: false
		});
		expect(c.requestLog).toBe(true);
	});

	it('points development at the local fakes', () => {
		const c = parseConfig({ NESTMARK_ENV: 'development' });
		expect(c.lenient).toBe(true);
		expect(c.nestingGuard).toBe(true);
		expect(c.storage).toMatchObject({
			endpoint: 'http://127.0.0.1:4569',
			accessKeyId: 'S3RVER',
			forcePathStyle: true
		});
	});

	it('counts blank values as not set', () => {
		const c = parseConfig({ SMTP_USER: '', DB_POOL_SIZE: ' ', NESTMARK_ENV: '' });
		expect(c.smtp.user).toBeUndefined();
		expect(c.pool.size).toBe(10);
		expect(c.environment).toBe('production');
	});

	it('keeps only the origin of ORIGIN', () => {
		expect(parseConfig({ ORIGIN: 'https://nm.example:8443/some/path' }).origin).toBe(
			'https://nm.example:8443'
		);
	});

	it('names every bad variable, with the value unless it may hold a secret', () => {
		const found = problems({
			NESTMARK_ENV: 'prod',
			DB_POOL_SIZE: '0',
			SMTP_PORT: '70000',
			ORIGIN: 'nestmark.example',
			DATABASE_URL: 'postgres://u:hunter2@db/x',
			NESTMARK_DUE_SCAN_MINUTES: 'often',
			S3_FORCE_PATH_STYLE: 'yes'
		});
		expect(found).toEqual(
			expect.arrayContaining([
				'NESTMARK_ENV must be development, test or production, not "prod"',
				'DB_POOL_SIZE must be a whole number of at least 1, not "0"',
				'SMTP_PORT must be a port number (1 to 65535), not "70000"',
				'ORIGIN must be an absolute http:// or https:// URL, not "nestmark.example"',
				'NESTMARK_DUE_SCAN_MINUTES must be a number of minutes (0 switches the scan off), not "often"',
				'S3_FORCE_PATH_STYLE must be true or false, not "yes"'
			])
		);
		const db = found.find((p) => p.startsWith('DATABASE_URL'));
		expect(db).toMatch(/mysql:\/\//);
		expect(db).not.toMatch(/hunter2/);
		expect(found).toHaveLength(7);
	});
});

describe('configure (the server at start)', () => {
	it('refuses a production start without ORIGIN, AUTH_SECRET or DATABASE_URL, naming each', () => {
		expect(() => configure({ NESTMARK_ENV: 'production' })).toThrow(ConfigError);
		try {
			configure({});
		} catch (e) {
			const message = (e as Error).message;
			expect(message).toMatch(/DATABASE_URL is not set/);
			expect(message).toMatch(/ORIGIN is not set/);
			expect(message).toMatch(/AUTH_SECRET is not set/);
		}
	});

	it('lets development start without ORIGIN and AUTH_SECRET', () => {
		const c = configure({
			NESTMARK_ENV: 'development',
			DATABASE_URL: 'mysql://nestmark:pw@127.0.0.1:3307/nestmark'
		});
		expect(c.environment).toBe('development');
	});
});
