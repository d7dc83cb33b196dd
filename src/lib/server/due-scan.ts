/**
 * The calendar scan as a job in the server process: cleaning and inspection flags that fall due
 * with the passing of days, when nothing is logged on the fixture, are raised every
 * NESTMARK_DUE_SCAN_MINUTES (default 15; 0 switches the job off) and on reads of health.
 */
import { config, parseConfig, type Env } from './config';
import { evaluateDueFlags, type FlagChange } from './health';

/** Reads of health run a full scan at most this often (a read of one fixture scans just it). */
const READ_SCAN_MIN_GAP_MS = 60_000;

interface Job {
	timer: ReturnType<typeof setInterval> | null;
	running: Promise<FlagChange[]> | null;
	lastFullScanAt: number;
}

// On globalThis so a module reloaded by the dev server does not start a second timer.
const KEY = Symbol.for('nestmark.dueScan');
const store = globalThis as unknown as Record<symbol, Job | undefined>;
const job: Job = (store[KEY] ??= { timer: null, running: null, lastFullScanAt: 0 });

/** The scan interval (NESTMARK_DUE_SCAN_MINUTES) in ms; null when the job is switched off. */
export function dueScanIntervalMs(env?: Env): number | null {
	return (env ? parseConfig(env) : config()).dueScanIntervalMs;
}

/** One full scan; a scan already under way is joined rather than doubled. */
export function runDueScan(now: Date = new Date()): Promise<FlagChange[]> {
	job.running ??= evaluateDueFlags(now).finally(() => {
		job.lastFullScanAt = Date.now();
		job.running = null;
	});
	return job.running;
}

async function tick(): Promise<void> {
	// A tick that finds a scan under way leaves it to the run that started it.
	if (job.running) return;
	try {
		const changes = await runDueScan();
		const raised = changes.reduce((n, c) => n + c.raised.length, 0);
		if (raised) console.log(`due scan: ${raised} calendar flag(s) raised`);
	} catch (err) {
		// A failed run must not stop the timer; the next run tries again.
		console.error('due scan failed:', err);
	}
}

/**
 * Starts the scheduled scan once per process (later calls do nothing): a first run soon after
 * start, then one every interval. The timer does not keep the process alive.
 */
export function startDueScan(options: { intervalMs?: number | null } = {}): boolean {
	if (job.timer) return false;
	const interval = options.intervalMs === undefined ? dueScanIntervalMs() : options.intervalMs;
	if (interval === null) return false;
	job.timer = setInterval(tick, interval);
	job.timer.unref?.();
	setTimeout(tick, Math.min(interval, 5_000)).unref?.();
	return true;
}

/** Stops the scheduled scan (tests, shutdown). */
export function stopDueScan(): void {
	if (job.timer) clearInterval(job.timer);
	job.timer = null;
}

/**
 * The scan on read: for one fixture it runs at once (the page shows what is due now); for lists
 * a full scan runs unless one finished within the last minute.
 */
export async function scanOnRead(fixtureId?: number, now: Date = new Date()): Promise<void> {
	if (fixtureId !== undefined) {
		await evaluateDueFlags(now, [fixtureId]);
		return;
	}
	if (Date.now() - job.lastFullScanAt >= READ_SCAN_MIN_GAP_MS) await runDueScan(now);
}
