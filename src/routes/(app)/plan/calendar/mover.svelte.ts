/**
 * Moving orders on the calendar, by drag and drop or by keyboard: which order is picked up, the
 * day it would go to, what to announce, and the move itself (a post to `?/move`, the same action
 * the date field's plain form uses).
 */
import { deserialize } from '$app/forms';
import { goto } from '$app/navigation';
import { tick } from 'svelte';
import { moveRefusal, stepTarget, type TargetKey } from '$lib/domain/calendar';
import type { CalendarOrder } from '$lib/schemas/calendar';
import { ACTION_LOOK } from './action-look';
import { dayLong } from './day-words';

const ARROWS: readonly string[] = ['ArrowLeft', 'ArrowRight', 'ArrowUp', 'ArrowDown'];

/** "Clean NM-4K7Q". */
export const orderLabel = (o: CalendarOrder) => `${ACTION_LOOK[o.action].word} ${o.fixtureCode}`;

export class Mover {
	/** Picked up by keyboard (or a click), waiting for a target. */
	picked = $state<CalendarOrder | null>(null);
	target = $state<string | null>(null);
	/** Being dragged with the mouse, and the day under it. */
	dragging = $state<CalendarOrder | null>(null);
	dragOver = $state<string | null>(null);
	busyId = $state<number | null>(null);
	/** What the live region says. */
	announcement = $state('');
	/** A refused move: which order, and the service's sentence. */
	error = $state<{ id: number | null; message: string } | null>(null);

	constructor(
		private readonly shown: () => { from: string; to: string },
		private readonly back: () => string
	) {}

	/** Picks an order up for the keyboard; a done or cancelled one says why it stays. */
	pick(o: CalendarOrder) {
		const refusal = moveRefusal(o.status);
		if (refusal) {
			this.announcement = `${orderLabel(o)} cannot move. ${refusal}`;
			return;
		}
		const { from, to } = this.shown();
		this.picked = o;
		this.error = null;
		this.target = o.dueOn && o.dueOn >= from && o.dueOn <= to ? o.dueOn : from;
		this.announcement = `Picked up ${orderLabel(o)}. Target: ${dayLong(this.target)}. Arrow keys move the target a day or a week; Enter moves it there; Escape puts it back.`;
	}

	cancel() {
		if (!this.picked) return;
		this.announcement = `${orderLabel(this.picked)} put back; nothing moved.`;
		this.picked = null;
		this.target = null;
	}

	step(key: TargetKey) {
		if (!this.target) return;
		const next = stepTarget(this.target, key, this.shown());
		if (!next) {
			this.announcement = `${dayLong(this.target)} is the edge of what is shown. To go further, put the order back (Escape), show the next period, and pick it up there.`;
			return;
		}
		this.target = next;
		this.announcement = `Target: ${dayLong(next)}.`;
	}

	/** Keys on a chip: Enter or Space picks up, then arrows, Enter drops, Escape cancels. */
	keydown(e: KeyboardEvent, o: CalendarOrder) {
		const mine = this.picked?.id === o.id;
		if (e.key === 'Enter' || e.key === ' ') {
			e.preventDefault();
			if (!mine) this.pick(o);
			else if (e.key === 'Enter') void this.drop();
		} else if (mine && ARROWS.includes(e.key)) {
			e.preventDefault();
			this.step(e.key as TargetKey);
		} else if (mine && e.key === 'Escape') {
			e.preventDefault();
			this.cancel();
		}
	}

	async drop() {
		const o = this.picked;
		const to = this.target;
		this.picked = null;
		this.target = null;
		if (!o || !to) return;
		if (to === o.dueOn) {
			this.announcement = `${orderLabel(o)} stays on ${dayLong(to)}; nothing moved.`;
			return;
		}
		await this.move(o, to);
	}

	dragStart(e: DragEvent, o: CalendarOrder) {
		if (moveRefusal(o.status) || !e.dataTransfer) return;
		this.dragging = o;
		this.picked = null;
		e.dataTransfer.effectAllowed = 'move';
		e.dataTransfer.setData('text/plain', String(o.id));
	}

	dragEnd() {
		this.dragging = null;
		this.dragOver = null;
	}

	/** Over a day: accept the drop only while one of our orders is dragged. */
	dragOverDay(e: DragEvent, date: string) {
		if (!this.dragging) return;
		e.preventDefault();
		if (e.dataTransfer) e.dataTransfer.dropEffect = 'move';
		this.dragOver = date;
	}

	async dropOnDay(e: DragEvent, date: string) {
		const o = this.dragging;
		this.dragEnd();
		if (!o) return;
		e.preventDefault();
		if (o.dueOn === date) return;
		await this.move(o, date);
	}

	/** Posts the move; on success the calendar reloads in place and the order keeps focus. */
	async move(o: CalendarOrder, dueOn: string) {
		this.busyId = o.id;
		this.error = null;
		this.announcement = `Moving ${orderLabel(o)} to ${dayLong(dueOn)}…`;
		const body = new FormData();
		body.set('id', String(o.id));
		body.set('dueOn', dueOn);
		body.set('from', o.dueOn ?? '');
		body.set('back', this.back());
		try {
			const res = await fetch('?/move', {
				method: 'POST',
				body,
				headers: { accept: 'application/json', 'x-sveltekit-action': 'true' }
			});
			const result = deserialize(await res.text());
			if (result.type === 'redirect') {
				await goto(result.location, { invalidateAll: true, noScroll: true, replaceState: true });
				this.announcement = `Moved ${orderLabel(o)} to ${dayLong(dueOn)}.`;
				await tick();
				document.getElementById(`order-${o.id}`)?.focus();
			} else if (result.type === 'failure') {
				const message = String(result.data?.moveError ?? 'The move was refused.');
				this.error = { id: o.id, message };
				this.announcement = message;
			} else {
				const message =
					result.type === 'error'
						? String(result.error?.message ?? 'The move failed.')
						: 'The move failed.';
				this.error = { id: o.id, message };
				this.announcement = message;
			}
		} catch {
			const message = 'The move could not be sent: check the connection and try again.';
			this.error = { id: o.id, message };
			this.announcement = message;
		} finally {
			this.busyId = null;
		}
	}
}
