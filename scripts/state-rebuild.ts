/**
 * Recomputes every fixture's state from its full event history and reports each fixture whose
 * stored state differed (code and fields). Exit code 0 when none differed, 1 when some did
 * (with --fix too, so a script can tell that something had to be repaired).
 *
 *   npm run state:rebuild            report only
 *   npm run state:rebuild -- --fix   also write the recomputed states and re-evaluate their flags
 */
import { closeDb } from '$lib/server/db';
import { rebuildStates } from '$lib/server/health';

const args = process.argv.slice(2);
const unknown = args.filter((a) => a !== '--fix');
if (unknown.length) {
	console.error(`state:rebuild: unknown option ${unknown.join(' ')} (only --fix)`);
	process.exit(2);
}
const fix = args.includes('--fix');

try {
	const report = await rebuildStates({ fix });
	for (const d of report.differing) {
		console.log(`${d.code}: stored state differs in ${d.fields.join(', ')}`);
	}
	const n = report.differing.length;
	console.log(
		`state:rebuild: ${report.checked} fixtures checked, ${n} differed` +
			(n && fix ? '; recomputed states and flags written' : '')
	);
	process.exitCode = n ? 1 : 0;
} finally {
	await closeDb();
}
