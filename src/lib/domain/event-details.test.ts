import { describe, expect, it } from 'vitest';
import { eventDetails } from './event-details';

const placeOf = (id: string) => (id === '7' ? 'Larchmere / CMM lab / CMM 2' : `location ${id}`);

describe('eventDetails', () => {
	it('says how a cleaning was done and whether the contacts were relubricated', () => {
		expect(
			eventDetails(
				'cleaning',
				{ method: 'solvent-wipe', relubricated: true, lubricant: 'light instrument oil' },
				placeOf
			).summary
		).toBe('Solvent wipe; relubricated with light instrument oil');
		const dry = eventDetails(
			'cleaning',
			{ method: 'dry-wipe', relubricated: false, note: 'Chips in vee 2.' },
			placeOf
		);
		expect(dry).toEqual({
			summary: 'Dry wipe; not relubricated',
			lines: ['Note: Chips in vee 2.'],
			photoIds: []
		});
	});

	it('lists every graded contact with its grade name and marks, the verdict and the photos', () => {
		const d = eventDetails(
			'inspection',
			{
				contacts: [
					{ contact: 'Ball 1', grade: 1, marks: [] },
					{ contact: 'Vee 2', grade: 2, marks: ['fretting', 'debris'] }
				],
				verdict: 'watch',
				photoIds: ['0b6c1a4e-2f7d-4f0e-9a51-3c1f5d2e8a90'],
				note: 'Reddish dust on vee 2.'
			},
			placeOf
		);
		expect(d.summary).toBe('Verdict: watch — worst grade 2 (Dulled)');
		expect(d.lines).toEqual([
			'Ball 1: grade 1 (Tracked)',
			'Vee 2: grade 2 (Dulled), fretting and debris',
			'Note: Reddish dust on vee 2.'
		]);
		expect(d.photoIds).toEqual(['0b6c1a4e-2f7d-4f0e-9a51-3c1f5d2e8a90']);
	});

	it('gives cycles and readings of reseats and break-in runs', () => {
		expect(
			eventDetails('reseat', { cycles: 6, readings: { dx: 0.12, dy: -0.05 } }, placeOf).summary
		).toBe('6 cycles, last seating read dx 0.12 µm, dy −0.05 µm');
		expect(eventDetails('reseat', {}, placeOf).summary).toBe('1 cycle, no readings');
		expect(
			eventDetails('break-in', { cycles: 40, readings: [{ dx: 1 }, { dx: 2 }] }, placeOf).summary
		).toBe('40 cycles run, 2 readings');
	});

	it('names parts swapped, places moved between, hold reasons, releases and notes', () => {
		expect(
			eventDetails('part-swap', { replaced: ['balls', 'seats'], note: 'New set.' }, placeOf)
		).toEqual({ summary: 'Replaced balls and seats', lines: ['Note: New set.'], photoIds: [] });
		expect(eventDetails('move', { fromLocationId: 3, toLocationId: 7 }, placeOf).summary).toBe(
			'From location 3 to Larchmere / CMM lab / CMM 2'
		);
		expect(eventDetails('move', { locationId: '7', fromLocationId: '3' }, placeOf).summary).toBe(
			'From location 3 to Larchmere / CMM lab / CMM 2'
		);
		expect(eventDetails('move', { locationId: '7' }, placeOf).summary).toBe(
			'To Larchmere / CMM lab / CMM 2'
		);
		expect(eventDetails('hold', { reason: 'Crash' }, placeOf).summary).toBe('Reason: Crash');
		expect(eventDetails('release', { note: 'Checked.' }, placeOf)).toEqual({
			summary: 'Back in service',
			lines: ['Note: Checked.'],
			photoIds: []
		});
		expect(eventDetails('note', { text: 'Cover left off.' }, placeOf).summary).toBe(
			'Cover left off.'
		);
	});

	it('reads a payload with missing or odd fields without failing', () => {
		expect(eventDetails('inspection', { contacts: [{}], photoIds: [3] }, placeOf)).toEqual({
			summary: '',
			lines: ['Contact: not graded'],
			photoIds: []
		});
		expect(eventDetails('unknown-kind', {}, placeOf).summary).toBe('');
	});
});
