import { describe, expect, it } from 'vitest';
import { freshBreakIn, rollingRepeatability, runVerdict } from '$lib/domain/break-in-run';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import { runChartConfig } from './run-chart';

const run = Array.from({ length: 22 }, (_, i) => ({ dx: i % 2 ? -0.1 : 0.1 }));

describe('runChartConfig', () => {
	it('draws rolling R and s, the settling windows, the spec and the settle band', () => {
		const v = runVerdict(freshBreakIn(), DEFAULT_POLICY, run);
		const cfg = runChartConfig(rollingRepeatability(run, 10), v, DEFAULT_POLICY);
		const sets = cfg.data.datasets;
		expect(sets.map((d) => d.label)).toEqual([
			'R = 4s, last 10 readings',
			's, last readings',
			'R of each settling window',
			'Spec 1 µm',
			'Settle band: last window ± 0.1 µm',
			'Settle band (lower)'
		]);
		// Rolling points from the 10th reading on; windows at cycles 10 and 20.
		expect(sets[0].data).toHaveLength(13);
		expect((sets[2].data as { x: number }[]).map((p) => p.x)).toEqual([10, 20]);
		const R = v.windows[1].R;
		expect((sets[4].data as { y: number }[])[0].y).toBeCloseTo(R + 0.1, 12);
		expect((sets[5].data as { y: number }[])[0].y).toBeCloseTo(R - 0.1, 12);
		// The axis runs to the policy's minimum while the run is shorter.
		expect(cfg.options?.scales?.x?.max).toBe(30);
	});

	it('has no settle band before the first window', () => {
		const short = run.slice(0, 4);
		const v = runVerdict(freshBreakIn(), DEFAULT_POLICY, short);
		const cfg = runChartConfig(rollingRepeatability(short, 10), v, DEFAULT_POLICY);
		expect(cfg.data.datasets).toHaveLength(4);
	});
});
