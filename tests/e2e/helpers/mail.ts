import { readdir, readFile, stat } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { simpleParser } from 'mailparser';

/** A captured message, parsed. */
export interface Captured {
	file: string;
	subject: string;
	text: string;
	links: string[];
}

/** The folder the fake SMTP server writes to (playwright.config.ts shares the app's value). */
export function captureDir(): string {
	return resolve(process.env.MAIL_CAPTURE_DIR ?? '.data/mail-test');
}

async function capturedTo(address: string, since: number): Promise<Captured[]> {
	const dir = captureDir();
	let files: string[] = [];
	try {
		files = (await readdir(dir)).filter((f) => f.endsWith('.eml')).sort();
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
	}
	const found: Captured[] = [];
	for (const file of files) {
		const path = join(dir, file);
		if ((await stat(path)).mtimeMs < since) continue;
		const m = await simpleParser(await readFile(path));
		const to = (Array.isArray(m.to) ? m.to : m.to ? [m.to] : []).flatMap((a) => a.value);
		if (!to.some((a) => a.address?.toLowerCase() === address.toLowerCase())) continue;
		const text = m.text ?? '';
		found.push({
			file,
			subject: m.subject ?? '',
			text,
			links: text.match(/https?:\/\/\S+/g) ?? []
		});
	}
	return found;
}

/** Waits (up to `timeoutMs`) for a message to `address` captured at or after `since` (ms). */
export async function waitForMail(
	address: string,
	since: number,
	timeoutMs = 10_000
): Promise<Captured> {
	const until = Date.now() + timeoutMs;
	for (;;) {
		const mails = await capturedTo(address, since - 1000);
		if (mails.length) return mails[mails.length - 1];
		if (Date.now() > until) throw new Error(`no mail to ${address} within ${timeoutMs} ms`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

/** All messages to `address` captured at or after `since` (ms), without waiting. */
export function mailSince(address: string, since: number): Promise<Captured[]> {
	return capturedTo(address, since - 1000);
}
