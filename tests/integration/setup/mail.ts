/**
 * vitest globalSetup for the integration project: the fake SMTP server (scripts/mail-fake.ts, the
 * one `npm start` and `npm test` use). `npm test` has already started it and exported SMTP_PORT and
 * MAIL_CAPTURE_DIR; run by hand (`npx vitest run`), a fake is started here on a free loopback port
 * with its own capture folder, and stopped after the run.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createConnection, createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { TestProject } from 'vitest/node';

declare module 'vitest' {
	export interface ProvidedContext {
		mail: { host: string; port: string; captureDir: string };
	}
}

/** Whether something accepts connections on host:port. */
function answers(host: string, port: number): Promise<boolean> {
	return new Promise((resolve) => {
		const socket = createConnection({ host, port });
		socket.once('connect', () => {
			socket.destroy();
			resolve(true);
		});
		socket.once('error', () => resolve(false));
	});
}

/** A loopback port nothing listens on right now. */
function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const server = createServer();
		server.once('error', reject);
		server.listen(0, '127.0.0.1', () => {
			const address = server.address();
			server.close(() => resolve(typeof address === 'object' && address ? address.port : 0));
		});
	});
}

async function until(ready: () => Promise<boolean>, child: ChildProcess, ms: number) {
	const end = Date.now() + ms;
	while (Date.now() < end) {
		if (child.exitCode !== null) throw new Error('the fake SMTP server exited on start');
		if (await ready()) return;
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`the fake SMTP server did not answer within ${ms} ms`);
}

export default async function setup(project: TestProject) {
	const host = '127.0.0.1';
	const given = Number(process.env.SMTP_PORT);
	if (process.env.MAIL_CAPTURE_DIR && given && (await answers(host, given))) {
		project.provide('mail', {
			host,
			port: String(given),
			captureDir: process.env.MAIL_CAPTURE_DIR
		});
		return;
	}
	const port = await freePort();
	const captureDir = mkdtempSync(join(tmpdir(), 'nestmark-mail-'));
	const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/mail-fake.ts'], {
		env: { ...process.env, SMTP_HOST: host, SMTP_PORT: String(port), MAIL_CAPTURE_DIR: captureDir },
		stdio: ['ignore', 'ignore', 'inherit']
	});
	await until(() => answers(host, port), child, 20_000);
	project.provide('mail', { host, port: String(port), captureDir });
	return async () => {
		const gone = new Promise((r) => child.once('exit', r));
		child.kill('SIGTERM');
		await gone;
		rmSync(captureDir, { recursive: true, force: true });
	};
}
