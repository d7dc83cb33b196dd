/**
 * `npm run bench`: the project's speed checks, each a section that prints its own figures and
 * ratios against a raw baseline measured in the same run. Sections run in order; name some on the
 * command line (`npm run bench -- domain`) to run only those.
 */
import { benchDomain } from './bench/domain';
import { benchFleet } from './bench/fleet';
import { benchIngest } from './bench/ingest';
import { benchScanBundle } from './bench/scan-bundle';
import { benchScanToWaiting } from './bench/scan-to-waiting';

const SECTIONS: { name: string; run: () => Promise<unknown> }[] = [
	{ name: 'domain', run: benchDomain },
	{ name: 'ingest', run: benchIngest },
	{ name: 'scan-bundle', run: benchScanBundle },
	{ name: 'scan-to-waiting', run: benchScanToWaiting },
	{ name: 'fleet', run: benchFleet }
];

const wanted = process.argv.slice(2);
const unknown = wanted.filter((w) => !SECTIONS.some((s) => s.name === w));
if (unknown.length) {
	console.error(
		`Unknown bench section(s): ${unknown.join(', ')}. Known: ${SECTIONS.map((s) => s.name).join(', ')}.`
	);
	process.exit(2);
}
for (const section of SECTIONS) {
	if (wanted.length && !wanted.includes(section.name)) continue;
	await section.run();
	console.log();
}
