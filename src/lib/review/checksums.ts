// Does a recomputed run reproduce a saved trace? Compares keyframe checksums step by step.

export type KeyframeChecksum = { step: number; checksum: string };

export type ChecksumComparison =
	| { status: 'match'; compared: number }
	| { status: 'mismatch'; compared: number; firstStep: number; saved: string | null; recomputed: string | null; differing: number };

/**
 * Compare saved against recomputed keyframe checksums. Every saved keyframe must be present with
 * the same checksum and no extra keyframe may appear: a different count means a different run.
 */
export function compareChecksums(saved: KeyframeChecksum[], recomputed: KeyframeChecksum[]): ChecksumComparison {
	const a = new Map(saved.map((k) => [k.step, k.checksum]));
	const b = new Map(recomputed.map((k) => [k.step, k.checksum]));
	const steps = [...new Set([...a.keys(), ...b.keys()])].sort((x, y) => x - y);
	let first: number | null = null;
	let differing = 0;
	for (const s of steps) {
		if (a.get(s) !== b.get(s)) {
			differing++;
			first ??= s;
		}
	}
	if (first === null) return { status: 'match', compared: steps.length };
	return { status: 'mismatch', compared: steps.length, firstStep: first, saved: a.get(first) ?? null, recomputed: b.get(first) ?? null, differing };
}
