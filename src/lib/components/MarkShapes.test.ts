import { render } from 'svelte/server';
import { describe, expect, it } from 'vitest';
import { MARK, markTilePath, markVeePath } from '$lib/content/mark';
import Logo from './Logo.svelte';

describe('the logo', () => {
	it('draws the mark from MARK: tile, vee, ball and dot with its numbers and colours', () => {
		const { body } = render(Logo, { props: { size: 48, withName: false } });
		expect(body).toContain(`viewBox="0 0 ${MARK.viewBox} ${MARK.viewBox}"`);
		expect(body).toContain(`d="${markTilePath()}" fill="${MARK.tile.fill}"`);
		expect(body).toContain(`d="${markVeePath()}"`);
		expect(body).toContain(`stroke="${MARK.vee.stroke}" stroke-width="${MARK.vee.width}"`);
		for (const c of [MARK.ball, MARK.dot]) {
			expect(body).toContain(`cx="${c.cx}" cy="${c.cy}" r="${c.r}" fill="${c.fill}"`);
		}
		expect(body).toContain('width="48" height="48"');
	});
});
