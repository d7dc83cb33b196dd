import { tick } from 'svelte';
import {
	listForFixture,
	onOutboxChange,
	type NewPhoto,
	type OutboxEntry
} from '$lib/client/outbox';
import { findFixture, putSnapshotFixture, snapshotInfo } from '$lib/client/register-snapshot';
import { UNDO_WINDOW_MS, type SyncEngine } from '$lib/client/sync.svelte';
import { EVENT_KIND_LABELS, mergeHistory, type ServerEvent } from '$lib/domain/event-history';
import type { EventKind, FieldErrors } from '$lib/schemas/events';
import type { SnapshotFixture } from '$lib/schemas/register-snapshot';
import { CARD_EVENT_LIMIT, fetchCard } from './card-data';

/** What the card's load gives (see +page.ts); read through a getter, as it changes with the code. */
export interface CardData {
	code: string;
	fixture: SnapshotFixture | null;
	events: ServerEvent[] | null;
	generatedAt: string | null;
	source: 'server' | 'device';
	serverTried: boolean;
}

/** The bar at the bottom after logging: undo while the entry waits, then what happened. */
export interface CardNotice {
	id: string;
	what: string;
	undoable: boolean;
	text?: string;
}

/** How long "taken back" / "already sent" stays on screen. */
const AFTER_UNDO_MS = 4_000;
/** The card asks the server again when the figures it was opened with are older than this. */
const STALE_MS = 60_000;
/** A phone on a weak signal stops waiting for the server this soon. */
const REFETCH_TIMEOUT_MS = 4_000;

/**
 * The fixture card's state: the load's data, replaced by fresher copies (the server's, or the
 * device's register copy when it is newer than a cached page), the device's own entries for this
 * fixture, and the undo notice. Every answer that arrives after an await is dropped when the page
 * has moved on to another code meanwhile, so one fixture's data never shows under another's code.
 */
export class CardState {
	readonly #data: () => CardData;
	readonly #sync: SyncEngine;
	/** Counts refreshes, so a slow one (it waited for the server) cannot undo a newer one. */
	#refreshes = 0;
	#noticeTimer: ReturnType<typeof setTimeout> | undefined;

	// Start from the load's data; replaced by fresher copies, reset when the code changes.
	fixture = $derived.by(() => this.#data().fixture);
	serverEvents = $derived.by(() => this.#data().events);
	/** The server failed to answer (offline); a device-first card asks it right after opening. */
	unreachable = $derived.by(() => this.#data().source === 'device' && this.#data().serverTried);
	/** This fixture's entries in the device's outbox. */
	local = $state<OutboxEntry[]>([]);
	notice = $state<CardNotice | null>(null);

	rows = $derived(mergeHistory(this.serverEvents ?? [], this.local, CARD_EVENT_LIMIT));
	/** Reseat cycles logged here that the server's count does not include yet. */
	unsyncedCycles = $derived(
		this.local
			.filter((e) => e.kind === 'reseat' && e.state !== 'rejected')
			.filter((e) => !this.serverEvents?.some((s) => s.id === e.id))
			.reduce((n, e) => n + (typeof e.payload.cycles === 'number' ? e.payload.cycles : 1), 0)
	);

	constructor(data: () => CardData, sync: SyncEngine) {
		this.#data = data;
		this.#sync = sync;
	}

	/** The code the page shows now; an answer for any other code is stale. */
	#current(code: string): boolean {
		return code === this.#data().code;
	}

	/**
	 * Called when the card opens on `code` (first, or after switching fixture): re-reads the outbox,
	 * prefers a newer device copy, asks the server when needed. Returns the outbox subscription's stop.
	 */
	open(code: string): () => void {
		// For the scan-to-waiting measure: the card is on screen and can be tapped.
		performance.mark('nm:card-shown', { detail: { code } });
		this.local = [];
		void this.#refresh(code);
		void this.#freshen(code);
		return onOutboxChange(() => void this.#refresh(code));
	}

	/** A page served from the offline cache may be older than the device's register copy. */
	async #freshen(code: string): Promise<void> {
		const data = this.#data();
		const info = await snapshotInfo();
		if (!this.#current(code)) return;
		const served = data.generatedAt;
		if (served && info.checkedAt && info.checkedAt > served) {
			const copy = await findFixture(code);
			if (!this.#current(code)) return;
			if (copy) this.fixture = copy;
		}
		const stale = served && Date.now() - Date.parse(served) > STALE_MS;
		if (data.source === 'device' && !data.serverTried) await this.#refetch(code);
		else if (stale && navigator.onLine) await this.#refetch(code);
	}

	/** Re-reads this fixture's outbox entries; when some left (delivered), the server's view too. */
	async #refresh(code: string): Promise<void> {
		const mine = ++this.#refreshes;
		const next = await listForFixture(code);
		const left = this.local.some((e) => !next.some((n) => n.id === e.id));
		if (left && navigator.onLine) await this.#refetch(code);
		if (this.#current(code) && mine === this.#refreshes) this.local = next;
	}

	async #refetch(code: string): Promise<void> {
		try {
			const r = await fetchCard(fetch, code, AbortSignal.timeout(REFETCH_TIMEOUT_MS));
			if (r.status === 'ok' && this.#current(code)) {
				this.fixture = r.fixture;
				this.serverEvents = r.events;
				this.unreachable = false;
				// Keep the device's copy as fresh as what was just shown.
				void putSnapshotFixture(r.fixture);
			}
		} catch {
			// Offline or timed out: keep what is shown, and say the server's view is missing.
			if (this.#current(code) && this.serverEvents === null) this.unreachable = true;
		}
	}

	/** Writes an event to the outbox and offers to undo it; field errors when it is invalid. */
	async log(
		kind: EventKind,
		payload: Record<string, unknown>,
		photos?: NewPhoto[]
	): Promise<FieldErrors | null> {
		const code = this.#data().code;
		const r = await this.#sync.log({ fixtureCode: code, kind, payload, photos });
		if (!r.ok) return r.errors;
		if (this.#current(code))
			this.local = [...this.local.filter((e) => e.id !== r.entry.id), r.entry];
		await tick();
		performance.mark('nm:entry-waiting');
		this.#showNotice(
			{ id: r.entry.id, what: EVENT_KIND_LABELS[kind] ?? kind, undoable: true },
			UNDO_WINDOW_MS
		);
		return null;
	}

	/** Takes back the entry the notice is about, if it has not been sent yet. */
	async undo(): Promise<void> {
		const notice = this.notice;
		if (!notice) return;
		clearTimeout(this.#noticeTimer);
		if (await this.#sync.undo(notice.id)) {
			this.local = this.local.filter((e) => e.id !== notice.id);
			this.#showNotice(
				{ ...notice, undoable: false, text: `${notice.what} taken back` },
				AFTER_UNDO_MS
			);
		} else {
			this.#showNotice(
				{ ...notice, undoable: false, text: 'Already sent: log a note to correct it' },
				AFTER_UNDO_MS
			);
		}
	}

	#showNotice(notice: CardNotice, forMs: number): void {
		clearTimeout(this.#noticeTimer);
		this.notice = notice;
		this.#noticeTimer = setTimeout(() => (this.notice = null), forMs);
	}

	/** Stops the notice's timer when the card goes away. */
	dispose(): void {
		clearTimeout(this.#noticeTimer);
	}
}
