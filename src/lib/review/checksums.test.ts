import { describe, expect, it } from 'vitest';
import { compareChecksums } from './checksums';

// Invented checksum values; the rule (same keyframes, same hashes) is the product's own.
describe('compareChecksums', () => {
	it('matches identical lists in any order', () => {
		expect(compareChecksums([{ step: 0, checksum: 'aa' }, { step: 1024, checksum: 'bb' }], [{ step: 1024, checksum: 'bb' }, { step: 0, checksum: 'aa' }])).toEqual({ status: 'match', compared: 2 });
	});
	it('names the first differing keyframe', () => {
		const r = compareChecksums([{ step: 0, checksum: 'aa' }, { step: 1024, checksum: 'bb' }], [{ step: 0, checksum: 'aa' }, { step: 1024, checksum: 'cc' }]);
		expect(r).toEqual({ status: 'mismatch', compared: 2, firstStep: 1024, saved: 'bb', recomputed: 'cc', differing: 1 });
	});
	it('treats a missing or extra keyframe as a mismatch', () => {
		const r = compareChecksums([{ step: 0, checksum: 'aa' }], [{ step: 0, checksum: 'aa' }, { step: 1024, checksum: 'dd' }]);
		expect(r.status).toBe('mismatch');
		if (r.status === 'mismatch') expect([r.firstStep, r.saved, r.recomputed]).toEqual([1024, null, 'dd']);
	});
});
