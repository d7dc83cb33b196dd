/**
 * The sync loop: sends the outbox to `POST /api/sync` in batches, then waiting photos, refreshes
 * the register copy, and keeps the counts the indicator shows. It runs when the app starts, when
 * the network comes back or the tab comes back into view, once a logged entry's undo window has
 * passed, when someone taps "Sync now", and on a timer that backs off while the server cannot be
 * reached.
 */
import { getContext, setContext } from 'svelte';
import {
	batches,
	halves,
	nextSyncDelayMs,
	parseRetryAfter,
	refusalAction,
	SYNC_BATCH_SIZE,
	SYNC_IDLE_POLL_MS
} from '$lib/client/sync-schedule';
import { getMeta, setMeta } from './db';
import { getDeviceId } from './device-id';
import * as outbox from './outbox';
import * as photos from './photos';
import { refreshSnapshot } from './register-snapshot';

/** New entries wait this long before sending, so a mistaken tap can be undone. */
export const UNDO_WINDOW_MS = 5_000;

const isoNow = () => new Date().toISOString();

type BatchOutcome = 'ok' | 'network' | 'signed-out' | 'server';

/**
 * What one pass learnt from the answers: whether the server took anything, and the entries it
 * failed on alone.
 */
interface PassReport {
	/** The server answered some request of this pass: results, or one refused entry (400, 413). */
	answered: boolean;
	/** Single entries that got a 5xx: set aside if the server works for the others. */
	suspects: { id: string; error: string }[];
}

/** The signed-in person as far as the device knows (from the page), or null. */
export type SyncUser = { name: string } | null;

/** Sync state for the whole app, shared through setSync/getSync. */
export class SyncEngine {
	/** Entries not yet accepted (waiting or in flight). */
	pending = $state(0);
	/** Entries the server refused; they wait for a person. */
	rejected = $state(0);
	/** Photos on the device not yet uploaded (they go after their event), and photos refused. */
	photosPending = $state(0);
	photosRejected = $state(0);
	/** Last time the outbox was confirmed delivered (ISO 8601), or null if never. */
	lastSyncAt = $state<string | null>(null);
	online = $state(true);
	/** The server said the session is gone: entries wait until the person signs in again. */
	signedOut = $state(false);
	syncing = $state(false);
	/** The last failure other than a lost network, in words. */
	problem = $state<string | null>(null);
	/**
	 * Goes up whenever the counts are re-read (any outbox or photo change, every pass), so views
	 * listing entries know to re-read.
	 */
	revision = $state(0);

	#user: SyncUser = null;
	#fetch: typeof fetch;
	#holdMs: number;
	#failures = 0;
	/** How long the server last asked to be left alone (Retry-After), until a pass succeeds. */
	#retryAfterMs: number | null = null;
	/** After a failure, no automatic pass before this time (ms since the epoch); 0 when none. */
	#notBefore = 0;
	/** Photos that could upload now (their event delivered), for the timer. */
	#photosReady = 0;
	#timer: ReturnType<typeof setTimeout> | undefined;
	#running: Promise<void> | null = null;
	#again: 'none' | 'normal' | 'forced' = 'none';
	#lastSnapshotCheck = 0;
	#stop: (() => void) | undefined;

	constructor(options: { fetch?: typeof fetch; holdMs?: number } = {}) {
		this.#fetch = options.fetch ?? ((...a) => fetch(...a));
		this.#holdMs = options.holdMs ?? UNDO_WINDOW_MS;
	}

	/** Starts the loop (browser only); returns the function that stops it. */
	start(user: SyncUser): () => void {
		this.#user = user;
		this.online = navigator.onLine;
		const wake = () => {
			this.online = navigator.onLine;
			void this.run();
		};
		const offline = () => (this.online = false);
		const visible = () => document.visibilityState === 'visible' && void this.run();
		const unsubscribe = outbox.onOutboxChange(() => void this.#refreshCounts());
		const unsubscribePhotos = photos.onPhotosChange(() => void this.#refreshCounts());
		window.addEventListener('online', wake);
		window.addEventListener('offline', offline);
		document.addEventListener('visibilitychange', visible);
		void getMeta('lastSyncAt').then((v) => (this.lastSyncAt ??= v ?? null));
		// The first pass waits for a quiet moment, so it does not slow the page's first tap.
		const idle = window.requestIdleCallback ?? ((f: () => void) => setTimeout(f, 1_000));
		void this.#refreshCounts().then(() => idle(() => void this.run(), { timeout: 2_000 }));
		this.#stop = () => {
			clearTimeout(this.#timer);
			unsubscribe();
			unsubscribePhotos();
			window.removeEventListener('online', wake);
			window.removeEventListener('offline', offline);
			document.removeEventListener('visibilitychange', visible);
		};
		return () => this.#stop?.();
	}

	/** Tells the loop who is signed in now; a new sign-in sends what waited. */
	setUser(user: SyncUser): void {
		const was = this.#user;
		this.#user = user;
		if (user && (!was || this.signedOut)) {
			this.signedOut = false;
			void this.run();
		}
	}

	/**
	 * Writes an event to the outbox (always first; its photos and the record it `replaces` in the
	 * same transaction), then lets the loop send it after the undo window.
	 */
	async log(event: outbox.NewEvent, replaces?: outbox.Replaces): Promise<outbox.AddResult> {
		const result = await outbox.addEntry(event, this.#user?.name, replaces);
		// The outbox listener refreshes the counts; here only the send is timed.
		// A new entry does not cut short a back-off (or a wait the server asked for).
		if (result.ok) this.#schedule(Math.max(this.#holdMs + 50, this.#notBefore - Date.now()));
		return result;
	}

	/** Takes back an entry that has not been sent yet; false when it is already on its way. */
	async undo(id: string): Promise<boolean> {
		return outbox.discardEntry(id, true);
	}

	/** "Sync now": sends everything waiting at once, undo window or not, and forgets the back-off. */
	syncNow(): Promise<void> {
		this.#failures = 0;
		this.#retryAfterMs = null;
		this.#notBefore = 0;
		this.signedOut = false;
		return this.run(true);
	}

	/** One pass of the loop; concurrent calls share it and ask for one more pass. */
	run(force = false): Promise<void> {
		if (this.#running) {
			this.#again = force || this.#again === 'forced' ? 'forced' : 'normal';
			return this.#running;
		}
		this.#running = this.#locked(() => this.#pass(force)).finally(() => {
			this.#running = null;
			const again = this.#again;
			this.#again = 'none';
			if (again !== 'none') void this.run(again === 'forced');
		});
		return this.#running;
	}

	/** Only one tab sends at a time (sending twice is harmless, but wasteful). */
	async #locked(fn: () => Promise<void>): Promise<void> {
		if (!('locks' in navigator)) return fn();
		await navigator.locks.request('nestmark-sync', fn);
	}

	async #pass(force: boolean): Promise<void> {
		clearTimeout(this.#timer);
		// A tab coming back into view does not cut short a back-off either; a tap on "Sync now" does.
		const wait = this.#notBefore - Date.now();
		if (!force && wait > 50) {
			this.#schedule(wait);
			return;
		}
		this.online = navigator.onLine;
		if (!this.#user || (this.signedOut && !force) || !this.online) {
			await this.#refreshCounts();
			if (this.#user && this.online && !this.signedOut) this.#scheduleNext();
			return;
		}
		this.syncing = true;
		let outcome: BatchOutcome = 'ok';
		let delivered = 0;
		let answered = false;
		try {
			const all = await outbox.sendableEntries();
			const now = Date.now();
			const due = force ? all : all.filter((e) => now - Date.parse(e.createdAt) >= this.#holdMs);
			const report: PassReport = { answered: false, suspects: [] };
			for (const batch of batches(due, SYNC_BATCH_SIZE)) {
				outcome = await this.#send(batch, report);
				if (outcome !== 'ok') break;
				delivered += batch.length;
				answered = true;
			}
			outcome = await this.#settleSuspects(report, outcome);
			if (outcome === 'ok') {
				// Photos go after their event, so the server can check they belong to it.
				const up = await photos.uploadWaiting(this.#fetch);
				this.#photosReady = up.remaining;
				if (up.outcome === 'network') this.online = navigator.onLine;
				if (up.outcome === 'server') this.problem = up.problem ?? null;
				outcome = up.outcome;
			}
			if (outcome === 'ok' && this.#snapshotDue(delivered > 0)) {
				const r = await refreshSnapshot(this.#fetch);
				if (r.status === 'signed-out') outcome = 'signed-out';
				else if (r.status === 'offline') outcome = 'network';
				else {
					this.#lastSnapshotCheck = Date.now();
					answered = true;
				}
			}
			if (outcome === 'ok') {
				this.#failures = 0;
				this.#retryAfterMs = null;
				this.problem = null;
				// "Synced" means the server answered and nothing is left to send.
				if (answered && due.length === all.length) await this.#markSynced();
			} else if (outcome === 'signed-out') {
				this.signedOut = true;
			} else {
				this.#failures += 1;
			}
		} finally {
			this.syncing = false;
			await this.#refreshCounts();
		}
		if (outcome !== 'signed-out') this.#scheduleNext();
	}

	/**
	 * Sends one batch and files the per-entry answers (outbox.applyResults). A batch the server
	 * refuses or fails on as a whole is split in halves until the entry at fault is found
	 * (refusalAction), so one bad entry never holds back the rest of the outbox.
	 */
	async #send(batch: outbox.OutboxEntry[], report: PassReport): Promise<BatchOutcome> {
		const marked = await outbox.markSending(batch.map((e) => e.id));
		if (!marked.length) return 'ok';
		const ids = marked.map((e) => e.id);
		let res: Response;
		try {
			res = await this.#fetch('/api/sync', {
				method: 'POST',
				headers: { 'Content-Type': 'application/json', Accept: 'application/json' },
				body: JSON.stringify({
					deviceId: await getDeviceId(),
					events: marked.map(({ id, fixtureCode, kind, occurredAt, payload }) => ({
						id,
						fixtureCode,
						kind,
						occurredAt,
						payload
					}))
				})
			});
		} catch {
			// No answer: the server may or may not have stored them. Ids make the retry safe.
			await outbox.markWaiting(ids);
			this.online = navigator.onLine;
			return 'network';
		}
		if (res.status === 401) {
			await outbox.markWaiting(ids);
			return 'signed-out';
		}
		const body = (await res.json().catch(() => null)) as {
			results?: outbox.SyncResult[];
			error?: string;
		} | null;
		if (res.ok && Array.isArray(body?.results)) {
			await outbox.applyResults(ids, body.results);
			report.answered = true;
			return 'ok';
		}
		await outbox.markWaiting(ids);
		const action = refusalAction(res.status, marked.length);
		if (action === 'split') {
			for (const half of halves(marked)) {
				const outcome = await this.#send(half, report);
				if (outcome !== 'ok') return outcome;
			}
			return 'ok';
		}
		if (action === 'reject') {
			report.answered = true;
			await outbox.rejectEntries(
				ids,
				body?.error ?? `The server refused this entry (${res.status}).`
			);
			return 'ok';
		}
		if (action === 'suspect') {
			report.suspects.push({
				id: ids[0],
				error: `The server failed on this entry (${res.status}${body?.error ? `: ${body.error}` : ''}) while it took the others; check it, then send it again.`
			});
			return 'ok';
		}
		if (res.status === 503 || res.status === 429) {
			this.#retryAfterMs = parseRetryAfter(res.headers.get('retry-after'), Date.now());
		}
		this.problem = body?.error ?? `The server answered ${res.status}; trying again later.`;
		return 'server';
	}

	/**
	 * Entries the server failed on one by one are set aside when it took other entries in the
	 * same pass (then the entry is at fault); when it took nothing, the server is at fault and
	 * everything waits for the next try.
	 */
	async #settleSuspects(report: PassReport, outcome: BatchOutcome): Promise<BatchOutcome> {
		if (!report.suspects.length) return outcome;
		if (report.answered) {
			for (const { id, error } of report.suspects) await outbox.rejectEntries([id], error);
			return outcome;
		}
		if (outcome !== 'ok') return outcome;
		this.problem = 'The server is failing; trying again later.';
		return 'server';
	}

	#snapshotDue(changed: boolean): boolean {
		return changed || Date.now() - this.#lastSnapshotCheck >= SYNC_IDLE_POLL_MS;
	}

	async #markSynced(): Promise<void> {
		const at = isoNow();
		this.lastSyncAt = at;
		await setMeta('lastSyncAt', at);
	}

	async #refreshCounts(): Promise<void> {
		const [c, p] = await Promise.all([outbox.outboxCounts(), photos.photoCounts()]);
		this.pending = c.pending;
		this.rejected = c.rejected;
		this.photosPending = p.pending;
		this.photosRejected = p.rejected;
		this.revision += 1;
	}

	#scheduleNext(): void {
		const pending = this.pending + this.#photosReady;
		const ms = nextSyncDelayMs({
			pending,
			failures: this.#failures,
			retryAfterMs: this.#retryAfterMs
		});
		this.#notBefore = this.#failures > 0 ? Date.now() + ms : 0;
		this.#schedule(ms);
	}

	#schedule(ms: number): void {
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => void this.run(), ms);
	}
}

const KEY = Symbol('nestmark-sync');

/** Provides the app's sync engine to everything below the calling component. */
export function setSync(engine: SyncEngine): SyncEngine {
	return setContext(KEY, engine);
}

/** The app's sync engine (set by the root layout). */
export function getSync(): SyncEngine {
	const engine = getContext<SyncEngine | undefined>(KEY);
	if (!engine) throw new Error('getSync() needs setSync() in the root layout');
	return engine;
}
