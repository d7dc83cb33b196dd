/**
 * Reads what the fake SMTP server (scripts/mail-fake.ts) captured, for tests that check mail
 * really went out. MAIL_CAPTURE_DIR is the folder the fake writes to.
 */
import { readdir, readFile } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { simpleParser } from 'mailparser';

/** The captured messages addressed to `to`, oldest first, parsed. */
export async function mailTo(to: string) {
	const dir = resolve(process.env.MAIL_CAPTURE_DIR ?? '.data/mail-test');
	let files: string[] = [];
	try {
		files = (await readdir(dir)).filter((f) => f.endsWith('.eml')).sort();
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
	}
	const all = await Promise.all(files.map(async (f) => simpleParser(await readFile(join(dir, f)))));
	return all.filter((m) => {
		const list = Array.isArray(m.to) ? m.to : m.to ? [m.to] : [];
		return list.some((a) => a.value.some((v) => v.address?.toLowerCase() === to.toLowerCase()));
	});
}

/** The first http(s) link in a text. */
export function firstLink(text: string | undefined): string | undefined {
	return /https?:\/\/\S+/.exec(text ?? '')?.[0];
}
