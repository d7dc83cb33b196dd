import { describe, expect, it } from 'vitest';
import { landingFor } from './landing';

describe('landing per role', () => {
	it('sends each role where its work is', () => {
		expect(landingFor(['operator'])).toBe('/scan');
		expect(landingFor(['technician'])).toBe('/work');
		expect(landingFor(['supervisor'])).toBe('/board');
		expect(landingFor(['planner'])).toBe('/plan');
		expect(landingFor(['admin'])).toBe('/board');
	});

	it('takes the first of supervisor, planner, technician, operator a person holds', () => {
		expect(landingFor(['operator', 'technician'])).toBe('/work');
		expect(landingFor(['technician', 'planner'])).toBe('/plan');
		expect(landingFor(['operator', 'supervisor'])).toBe('/board');
		expect(landingFor(['admin', 'operator'])).toBe('/scan');
	});

	it('sends someone without a role to the register', () => {
		expect(landingFor([])).toBe('/fixtures');
	});
});
