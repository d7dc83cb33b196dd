/**
 * One simulated phone of the soak. It follows the rules of the phone's sync loop
 * (src/lib/client/sync.svelte.ts) and photo uploads (src/lib/client/photos.ts), with the same
 * pure pieces from src/lib/client/sync-schedule.ts:
 *
 * - the outbox goes to `POST /api/sync` in batches of SYNC_BATCH_SIZE, oldest first, one pass at a
 *   time, stopping at the first batch that fails; accepted and duplicate entries leave it;
 * - a batch refused or failed on as a whole is split in halves (refusalAction, halves); a single
 *   entry refused (400, 413) is set aside, one failed on (5xx) is set aside only when the server
 *   took other entries in the same pass, else the pass fails;
 * - no answer (network, abort, timeout), 502–504 or 429: the entries stay and the next pass comes
 *   after nextSyncDelayMs — the back-off, and never before the server's Retry-After;
 * - 401: the person signs in again;
 * - photos go up by `PUT /api/attachments/{id}` only after their event has left the outbox.
 *
 * Unlike the phone it sends at once (no undo window, no 5 s wait between passes) and logs its next
 * burst of entries while it waits, as a person at a machine does, so its outbox grows during an
 * outage. Some requests are aborted by the client at a random moment, as a phone losing its
 * network mid-request would. Anything set aside or refused is a problem: the server was healthy
 * enough to take it.
 */
import {
	batches,
	halves,
	nextSyncDelayMs,
	parseRetryAfter,
	refusalAction,
	SYNC_BATCH_SIZE
} from '../../src/lib/client/sync-schedule.ts';
import { seededRandom } from '../../src/lib/domain/fixture-code.ts';
import type { OutEvent, OutPhoto, Work } from './workload.ts';

/** Share of requests the client aborts at a random moment. */
const ABORT_RATE = 0.03;
/** The aborts fall in the first this-many ms of a request. */
const ABORT_WITHIN_MS = 400;
/** A request with no answer by then is given up as the phone's fetch would be by the OS. */
const REQUEST_TIMEOUT_MS = 60_000;
/** Entries logged between passes, and the pause after a good pass. */
const BURST_MAX = 120;
const PAUSE_MAX_MS = 1_000;

/** One request as the clock saw it, for the unavailability figures. */
export interface Attempt {
	start: number;
	end: number;
	/** An answer below 500. Client aborts are neither success nor failure (null). */
	ok: boolean | null;
}

/** What all phones of the run share: the server, the clock, and the counts they keep. */
export interface Run {
	origin: string;
	/** Epoch ms after which phones stop. */
	deadline: number;
	/** Sync requests answered 200: when sent (epoch ms) and latency in ms. */
	latencies: { at: number; ms: number }[];
	/** Failed passes by cause ("aborted", "network", "http 503", …) and batch splits. */
	retries: Map<string, number>;
	answers: { accepted: number; duplicate: number; rejected: number };
	attempts: Attempt[];
	/** Things that must not happen: rejected events, refused photos, odd answers. */
	problems: string[];
	/** Entries the server has (accepted or duplicate), for the fault schedule. */
	delivered: number;
}

type Answer = { status: number; headers: Headers; body: Buffer };
type Outcome = { ok: true } | { ok: false; cause: string; retryAfterMs?: number | null };
/** What a pass learnt: whether the server took anything, and the entries it failed on alone. */
type PassReport = { answered: boolean; suspects: { event: OutEvent; status: number }[] };

const OK: Outcome = { ok: true };
const count = (run: Run, cause: string) =>
	run.retries.set(cause, (run.retries.get(cause) ?? 0) + 1);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** The sign-in form's request: e-mail and password, form-encoded (send it with an Origin header). */
export function signInRequest(account: { email: string; password: string }): RequestInit {
	return {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded' },
		body: new URLSearchParams({ ...account, redirectTo: '/' }).toString(),
		redirect: 'manual'
	};
}

/** The session cookie a sign-in answer sets, as a Cookie header; '' when it set none. */
export function sessionCookie(headers: Headers): string {
	return headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.filter((c) => /session-token=./.test(c))
		.join('; ');
}

/** A phone: its account, its shift's work, its outbox and waiting photos. */
export class Device {
	readonly outbox: OutEvent[] = [];
	readonly photos: OutPhoto[] = [];
	/** Ids that went out in some request: a `duplicate` for any other id would be a server bug. */
	readonly #sent = new Set<string>();
	#logged = 0;
	#failures = 0;
	#retryAfterMs: number | null = null;
	#cookie = '';
	readonly #random: () => number;

	constructor(
		readonly deviceId: string,
		readonly account: { email: string; password: string },
		readonly work: Work,
		readonly run: Run,
		seed: number
	) {
		this.#random = seededRandom(seed);
	}

	/** Works the whole shift: logs, syncs, waits, until everything is delivered or time is up. */
	async shift(): Promise<void> {
		const { run, work } = this;
		const photosOf = new Map<string, OutPhoto[]>();
		for (const p of work.photos) photosOf.set(p.eventId, [...(photosOf.get(p.eventId) ?? []), p]);
		while (Date.now() < run.deadline) {
			const burst = work.events.slice(
				this.#logged,
				this.#logged + 1 + Math.floor(this.#random() * BURST_MAX)
			);
			this.#logged += burst.length;
			this.outbox.push(...burst);
			for (const e of burst) this.photos.push(...(photosOf.get(e.id) ?? []));

			const pass = await this.#pass();
			if (pass.ok) {
				this.#failures = 0;
				this.#retryAfterMs = null;
				if (this.#logged === work.events.length && !this.outbox.length && !this.photos.length)
					return;
				await sleep(this.#random() * PAUSE_MAX_MS);
			} else {
				this.#failures += 1;
				if (pass.retryAfterMs != null) this.#retryAfterMs = pass.retryAfterMs;
				count(run, pass.cause);
				const wait = nextSyncDelayMs({
					pending: this.outbox.length,
					failures: this.#failures,
					retryAfterMs: this.#retryAfterMs
				});
				await sleep(Math.min(wait, Math.max(0, run.deadline - Date.now())));
			}
		}
	}

	/** One pass of the loop: every batch, then the photos whose event the server has. */
	async #pass(): Promise<Outcome> {
		if (!this.#cookie) {
			const signedIn = await this.#signIn();
			if (!signedIn.ok) return signedIn;
		}
		const report: PassReport = { answered: false, suspects: [] };
		let outcome = OK;
		for (const batch of batches([...this.outbox], SYNC_BATCH_SIZE)) {
			outcome = await this.#send(batch, report);
			if (!outcome.ok) break;
		}
		outcome = this.#settleSuspects(report, outcome);
		return outcome.ok ? this.#uploadPhotos() : outcome;
	}

	/** Sends one batch and files the answers, splitting it as the phone does. */
	async #send(batch: OutEvent[], report: PassReport): Promise<Outcome> {
		const firstTime = new Set(batch.filter((e) => !this.#sent.has(e.id)).map((e) => e.id));
		for (const e of batch) this.#sent.add(e.id);
		const started = Date.now();
		const res = await this.#request('/api/sync', {
			method: 'POST',
			headers: { 'content-type': 'application/json', accept: 'application/json' },
			body: JSON.stringify({ deviceId: this.deviceId, events: batch })
		});
		if (typeof res === 'string') return { ok: false, cause: res };
		if (res.status === 401) return this.#signedOut();
		if (res.status === 200) {
			this.run.latencies.push({ at: started, ms: Date.now() - started });
			const { results } = JSON.parse(res.body.toString('utf8')) as {
				results: { id: string; status: string; error?: string }[];
			};
			this.#file(batch, results, firstTime);
			report.answered = true;
			return OK;
		}
		const action = refusalAction(res.status, batch.length);
		if (action === 'split') {
			count(this.run, `batch split on ${res.status}`);
			for (const half of halves(batch)) {
				const outcome = await this.#send(half, report);
				if (!outcome.ok) return outcome;
			}
			return OK;
		}
		if (action === 'reject') {
			report.answered = true;
			this.#setAside(batch[0], `refused (${res.status}): ${res.body.toString('utf8')}`);
			return OK;
		}
		if (action === 'suspect') {
			report.suspects.push({ event: batch[0], status: res.status });
			return OK;
		}
		const asked = res.status === 503 || res.status === 429;
		return {
			ok: false,
			cause: `http ${res.status}`,
			retryAfterMs: asked ? parseRetryAfter(res.headers.get('retry-after'), Date.now()) : null
		};
	}

	/** Entries failed on alone: set aside if the server took others in this pass, else retried. */
	#settleSuspects(report: PassReport, outcome: Outcome): Outcome {
		if (!report.suspects.length) return outcome;
		if (report.answered) {
			for (const { event, status } of report.suspects) {
				this.#setAside(event, `set aside after a ${status} on it alone while others went through`);
			}
			return outcome;
		}
		return outcome.ok ? { ok: false, cause: `http ${report.suspects[0].status}` } : outcome;
	}

	#file(
		batch: OutEvent[],
		results: { id: string; status: string; error?: string }[],
		firstTime: Set<string>
	): void {
		if (results.length !== batch.length) {
			this.run.problems.push(
				`${this.deviceId}: ${results.length} answers to ${batch.length} events`
			);
			return;
		}
		batch.forEach((event, i) => {
			const r = results[i];
			if (r.id !== event.id)
				this.run.problems.push(`${this.deviceId}: answer for ${r.id} in place of ${event.id}`);
			if (r.status === 'duplicate' && firstTime.has(event.id)) {
				this.run.problems.push(
					`${this.deviceId}: ${event.id} answered duplicate on its first send`
				);
			}
			if (r.status === 'accepted' || r.status === 'duplicate') {
				this.run.answers[r.status]++;
				this.#remove(event);
				this.run.delivered++;
			} else {
				this.#setAside(event, r.error ?? r.status);
			}
		});
	}

	#setAside(event: OutEvent, why: string): void {
		this.run.answers.rejected++;
		this.run.problems.push(`${this.deviceId}: ${event.kind} ${event.id} rejected: ${why}`);
		this.#remove(event);
	}

	#remove(event: OutEvent): void {
		const i = this.outbox.indexOf(event);
		if (i >= 0) this.outbox.splice(i, 1);
	}

	/** Uploads the waiting photos whose event has left the outbox, oldest first. */
	async #uploadPhotos(): Promise<Outcome> {
		const waiting = new Set(this.outbox.map((e) => e.id));
		for (const photo of this.photos.filter((p) => !waiting.has(p.eventId))) {
			const form = new FormData();
			form.set('fixtureCode', photo.fixtureCode);
			form.set('eventId', photo.eventId);
			form.set(
				'file',
				new Blob([new Uint8Array(photo.bytes)], { type: 'image/png' }),
				`${photo.id}.png`
			);
			form.set(
				'thumb',
				new Blob([new Uint8Array(photo.thumb)], { type: 'image/png' }),
				`${photo.id}.thumb.png`
			);
			const res = await this.#request(`/api/attachments/${photo.id}`, {
				method: 'PUT',
				body: form
			});
			if (typeof res === 'string') return { ok: false, cause: res };
			if (res.status === 401) return this.#signedOut();
			if (res.status >= 500) return { ok: false, cause: `http ${res.status}` };
			if (res.status !== 200 && res.status !== 201) {
				this.run.problems.push(
					`${this.deviceId}: photo ${photo.id} refused (${res.status}): ${res.body.toString('utf8')}`
				);
			}
			this.photos.splice(this.photos.indexOf(photo), 1);
		}
		return { ok: true };
	}

	#signedOut(): Outcome {
		this.#cookie = '';
		return { ok: false, cause: 'signed out' };
	}

	async #signIn(): Promise<Outcome> {
		const res = await this.#request('/auth/callback/credentials', signInRequest(this.account));
		if (typeof res === 'string') return { ok: false, cause: res };
		const cookie = sessionCookie(res.headers);
		if (!cookie) {
			// Auth.js answers a failed sign-in with a redirect that names the error.
			const location = new URL(res.headers.get('location') ?? '/', this.run.origin);
			const error = location.searchParams.get('error') ?? res.status;
			return { ok: false, cause: `sign-in failed (${error})` };
		}
		this.#cookie = cookie;
		return { ok: true };
	}

	/**
	 * One request with the session and the Origin a browser sends; some are aborted at a random
	 * moment. Returns the answer, or why there was none.
	 */
	async #request(
		path: string,
		init: RequestInit
	): Promise<Answer | 'aborted' | 'network' | 'timeout'> {
		const controller = new AbortController();
		const stop: { why: 'aborted' | 'timeout' | null } = { why: null };
		const abort = (reason: 'aborted' | 'timeout') => {
			stop.why ??= reason;
			controller.abort();
		};
		const timers = [setTimeout(() => abort('timeout'), REQUEST_TIMEOUT_MS)];
		if (Math.random() < ABORT_RATE)
			timers.push(setTimeout(() => abort('aborted'), Math.random() * ABORT_WITHIN_MS));
		const attempt: Attempt = { start: Date.now(), end: 0, ok: null };
		try {
			const res = await fetch(`${this.run.origin}${path}`, {
				...init,
				headers: {
					...(init.headers as Record<string, string>),
					origin: this.run.origin,
					cookie: this.#cookie
				},
				signal: controller.signal
			});
			const body = Buffer.from(await res.arrayBuffer());
			attempt.ok = res.status < 500;
			return { status: res.status, headers: res.headers, body };
		} catch {
			if (stop.why !== 'aborted') attempt.ok = false;
			return stop.why ?? 'network';
		} finally {
			timers.forEach(clearTimeout);
			attempt.end = Date.now();
			this.run.attempts.push(attempt);
		}
	}
}
