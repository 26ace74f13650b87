// The run summary's verdict line. "Every stated angle holds" is only said when the run states
// some angle: a circuit nothing states an expected angle for (an imported gate list without a
// spec, say) gets a plain sentence that nothing was compared, never a tick.
import type { RunSummary } from '$lib/worker/protocol';

export type RunVerdict = { tone: 'holds' | 'diverged' | 'none'; text: string };

export function runVerdict(s: Pick<RunSummary, 'firstDivergence' | 'stated'>): RunVerdict {
	if (s.firstDivergence) return { tone: 'diverged', text: `✗ first divergence at step ${s.firstDivergence.step} on ${s.firstDivergence.label}` };
	if (s.stated.angles > 0) return { tone: 'holds', text: '✓ every stated angle holds for these inputs' };
	if (s.stated.bits > 0) return { tone: 'holds', text: '✓ every stated bit holds for these inputs; no qubit states an expected angle, so no angle is compared' };
	return { tone: 'none', text: 'no qubit states an expected angle here, so nothing is compared (a spec or QFT blocks state them)' };
}
