import { readdir, readFile, stat } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import type { simpleParser as SimpleParser } from 'mailparser';
import { config } from './config';

/** One message the local fake SMTP server captured. */
export interface CapturedMail {
	file: string;
	subject: string;
	from: string;
	to: string;
	date: string;
	text: string;
}

/** The captured-mail viewer exists only in development and test installations. */
export function mailViewerEnabled(): boolean {
	return config().lenient;
}

/** The folder the fake SMTP server writes .eml files to. */
export function mailCaptureDir(): string {
	return config().mailCaptureDir;
}

/** The newest captured messages first (at most `limit`); an empty list if the folder is missing. */
export async function listCapturedMail(limit = 50): Promise<CapturedMail[]> {
	const dir = mailCaptureDir();
	let names: string[];
	try {
		names = (await readdir(dir)).filter((n) => n.endsWith('.eml'));
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code === 'ENOENT') return [];
		throw e;
	}
	const dated = await Promise.all(
		names.map(async (file) => ({ file, mtime: (await stat(join(dir, file))).mtimeMs }))
	);
	dated.sort((a, b) => b.mtime - a.mtime || b.file.localeCompare(a.file));
	// mailparser (a dev dependency) is required at run time, not bundled: bundled into the server
	// build it breaks on nodemailer's directory imports, and only development and test
	// installations, which have dev dependencies, ever get here.
	const { simpleParser } = createRequire(import.meta.url)('mailparser') as {
		simpleParser: typeof SimpleParser;
	};
	return Promise.all(
		dated.slice(0, limit).map(async ({ file, mtime }) => {
			const parsed = await simpleParser(await readFile(join(dir, file)));
			const addresses = (v: typeof parsed.to) =>
				(Array.isArray(v) ? v : v ? [v] : []).map((a) => a.text).join(', ');
			return {
				file,
				subject: parsed.subject ?? '(no subject)',
				from: addresses(parsed.from),
				to: addresses(parsed.to),
				date: (parsed.date ?? new Date(mtime)).toISOString(),
				text: parsed.text ?? ''
			};
		})
	);
}
