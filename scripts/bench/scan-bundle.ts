/**
 * Scan-page JS size: the gzip size of the JavaScript the browser loads for /scan before anyone
 * taps "Start camera". Two parts:
 *  - the first load: SvelteKit's client entry (start + app), the route's layouts, its error page
 *    and the scan page, with everything they import statically;
 *  - start-up extras: modules the layout and shared code import dynamically (the service-worker
 *    registration, the register copy's refresh), counted because they load at start-up on every
 *    page. This is an upper bound: a dynamic import that waits for a user action would be
 *    counted too.
 * The scan page's own dynamic imports — the camera decoder (html5-qrcode) and the photo fallback
 * (jsQR) — wait for a tap and are reported separately. Goal for the sum: ≤ 120 KB gzip.
 *
 * Reads the built app (`npm run build`): the route's nodes from SvelteKit's server manifest,
 * import graphs from Vite's client manifest, and the bytes from build/client as served. Each file
 * is gzipped at level 9, as adapter-node precompresses its static files.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const ROUTE_ID = '/(app)/scan';
/** 120 KB, in kibibytes as browsers' network panels count them. */
const GOAL_BYTES = 120 * 1024;

interface ManifestChunk {
	file: string;
	name?: string;
	src?: string;
	isEntry?: boolean;
	isDynamicEntry?: boolean;
	imports?: string[];
	dynamicImports?: string[];
}
type ClientManifest = Record<string, ManifestChunk>;

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;

function readJson<T>(path: string): T {
	if (!existsSync(path)) throw new Error(`${path} is missing: run \`npm run build\` first.`);
	return JSON.parse(readFileSync(path, 'utf8')) as T;
}

/** The node indices SvelteKit loads for the route (from its server manifest). */
function routeNodes(): { layouts: number[]; errors: number[]; leaf: number } {
	const path = join(ROOT, '.svelte-kit', 'output', 'server', 'manifest-full.js');
	if (!existsSync(path)) throw new Error(`${path} is missing: run \`npm run build\` first.`);
	const text = readFileSync(path, 'utf8');
	const at = text.indexOf(`id: ${JSON.stringify(ROUTE_ID)}`);
	if (at < 0) throw new Error(`route ${ROUTE_ID} is not in the build`);
	const m = /page:\s*\{\s*layouts:\s*\[([^\]]*)\],\s*errors:\s*\[([^\]]*)\],\s*leaf:\s*(\d+)/.exec(
		text.slice(at)
	);
	if (!m) throw new Error(`cannot read the nodes of ${ROUTE_ID}`);
	const list = (s: string) =>
		s
			.split(',')
			.map((x) => x.trim())
			.filter((x) => x && x !== 'undefined')
			.map(Number);
	return { layouts: list(m[1]), errors: list(m[2]), leaf: Number(m[3]) };
}

/** Manifest keys reachable from `roots` through static imports only. */
function staticClosure(manifest: ClientManifest, roots: string[]): Set<string> {
	const seen = new Set<string>();
	const stack = [...roots];
	while (stack.length) {
		const key = stack.pop()!;
		if (seen.has(key)) continue;
		const chunk = manifest[key];
		if (!chunk) throw new Error(`chunk ${key} is not in the client manifest`);
		seen.add(key);
		stack.push(...(chunk.imports ?? []));
	}
	return seen;
}

function gzipSize(file: string): number {
	const served = join(ROOT, 'build', 'client', file);
	const path = existsSync(served) ? served : join(ROOT, '.svelte-kit', 'output', 'client', file);
	return gzipSync(readFileSync(path), { level: 9 }).length;
}

/** Prints and returns the gzip size of the JS /scan loads before the camera opens. */
export async function benchScanBundle(): Promise<{
	files: number;
	gzipBytes: number;
	goalBytes: number;
	lazyGzipBytes: number;
}> {
	console.log('\nScan page JS before the camera opens (gzip, level 9)');
	const manifest = readJson<ClientManifest>(
		join(ROOT, '.svelte-kit', 'output', 'client', '.vite', 'manifest.json')
	);
	const entries = Object.entries(manifest);
	const entry = (name: string) => {
		const found = entries.find(([, c]) => c.isEntry && c.name === name);
		if (!found) throw new Error(`no ${name} in the client manifest`);
		return found[0];
	};
	const route = routeNodes();
	const nodeKey = (i: number) => {
		const found = entries.find(([, c]) => c.name === `nodes/${i}`);
		if (!found) throw new Error(`node ${i} is not in the client manifest`);
		return found[0];
	};
	const appKey = entry('entry/app');
	const leafKey = nodeKey(route.leaf);
	const shellKeys = [...route.layouts, ...route.errors].map(nodeKey);

	const first = staticClosure(manifest, [entry('entry/start'), appKey, ...shellKeys, leafKey]);
	// The app entry's dynamic imports are every route's node, and the page's own wait for a tap.
	const deferredByPage = new Set(manifest[leafKey].dynamicImports ?? []);
	const extra = new Set<string>();
	const queue = [...first];
	while (queue.length) {
		const key = queue.pop()!;
		if (key === appKey || key === leafKey) continue;
		for (const d of manifest[key].dynamicImports ?? []) {
			if (deferredByPage.has(d)) continue;
			for (const k of staticClosure(manifest, [d])) {
				if (first.has(k) || extra.has(k)) continue;
				extra.add(k);
				queue.push(k);
			}
		}
	}
	const sizeOf = (keys: Iterable<string>) =>
		[...keys].map((k) => ({ file: manifest[k].file, bytes: gzipSize(manifest[k].file) }));
	const sum = (xs: { bytes: number }[]) => xs.reduce((s, f) => s + f.bytes, 0);
	const firstSizes = sizeOf(first);
	const extraSizes = sizeOf(extra);
	const sizes = [...firstSizes, ...extraSizes];
	const gzipBytes = sum(sizes);

	const lazy = [...staticClosure(manifest, [...deferredByPage])].filter(
		(k) => !first.has(k) && !extra.has(k)
	);
	const lazyGzipBytes = sum(sizeOf(lazy));
	const decoderEarly = [...first, ...extra].some((k) =>
		/html5-qrcode|jsqr/i.test(manifest[k].src ?? k)
	);

	const nodes = [...route.layouts, ...route.errors, route.leaf];
	console.log(`  route ${ROUTE_ID}: nodes ${nodes.join(', ')}; ${sizes.length} JS files`);
	for (const f of [...sizes].sort((a, b) => b.bytes - a.bytes).slice(0, 5)) {
		console.log(`    ${kb(f.bytes).padStart(9)}  ${f.file}`);
	}
	console.log(
		`  first load (static imports): ${kb(sum(firstSizes))} in ${firstSizes.length} files`
	);
	console.log(
		`  start-up extras (layout's dynamic imports): ${kb(sum(extraSizes))} in ${extraSizes.length} files`
	);
	console.log(
		`  before the camera: ${kb(gzipBytes)} gzip — goal ≤ ${kb(GOAL_BYTES)}: ` +
			(gzipBytes <= GOAL_BYTES ? 'met' : 'NOT met')
	);
	console.log(
		`  loaded on "Start camera" or a photo (html5-qrcode, jsQR): ${kb(lazyGzipBytes)} gzip` +
			(decoderEarly ? ' — WARNING: a decoder loads before the camera' : ', not before')
	);
	return { files: sizes.length, gzipBytes, goalBytes: GOAL_BYTES, lazyGzipBytes };
}

// Run on its own: `npx tsx scripts/bench/scan-bundle.ts`
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
	benchScanBundle().catch((e) => {
		console.error(e instanceof Error ? e.message : e);
		process.exit(1);
	});
}
