/**
 * Fails when a source file under src/lib is longer than MAX_LINES: a file that long holds more
 * than one idea, and the next change to it is harder to review. Run by `npm run lint:layers`.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';

const ROOT = 'src/lib';
const MAX_LINES = 450;
// Tests are left out: a long table of checked cases is not a design smell.
const SOURCE = /(?<!\.test)\.(ts|js|svelte)$/;

function* files(dir: string): Generator<string> {
	for (const entry of readdirSync(dir, { withFileTypes: true })) {
		const path = join(dir, entry.name);
		if (entry.isDirectory()) yield* files(path);
		else if (SOURCE.test(entry.name)) yield path;
	}
}

const long: { path: string; lines: number }[] = [];
for (const path of files(ROOT)) {
	const text = readFileSync(path, 'utf8');
	const lines = text.length === 0 ? 0 : text.split('\n').length - (text.endsWith('\n') ? 1 : 0);
	if (lines > MAX_LINES) long.push({ path: relative('.', path), lines });
}

if (long.length) {
	for (const f of long.sort((a, b) => b.lines - a.lines)) {
		console.error(`${f.path}: ${f.lines} lines (at most ${MAX_LINES})`);
	}
	console.error(
		`${long.length} file(s) under ${ROOT} over ${MAX_LINES} lines: split them by idea.`
	);
	process.exit(1);
}
console.log(`every source file under ${ROOT} is at most ${MAX_LINES} lines`);
