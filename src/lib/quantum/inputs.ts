/**
 * Register values as people type them: one value (decimal, 0b101 or 101b binary, 0x hex, `_`
 * between digits) and lists of `name=value` pairs (`a=5,b=0b11`). The workbench, the server and
 * the command line all read inputs here. Values are register values, index 0 = LSB.
 */

/** A register value from text: decimal, binary (0b101 or 101b), hex (0x1f); empty is 0. Bounded by `size` qubits when given. */
export function parseRegisterValue(raw: string, name: string, size?: number): bigint {
	const t = raw.trim().replace(/_/g, '');
	if (t === '') return 0n;
	let v: bigint;
	if (/^0b[01]+$/i.test(t)) v = BigInt(t);
	else if (/^[01]+b$/i.test(t)) v = BigInt('0b' + t.slice(0, -1));
	else if (/^0x[0-9a-f]+$/i.test(t)) v = BigInt(t);
	else if (/^\d+$/.test(t)) v = BigInt(t);
	else throw new RangeError(`${name}: "${raw}" is not a whole number (decimal, or binary as 0b101)`);
	if (size !== undefined && v >= 1n << BigInt(size)) throw new RangeError(`${name}: ${v} does not fit in ${size} qubit${size === 1 ? '' : 's'} (at most ${(1n << BigInt(size)) - 1n})`);
	return v;
}

/**
 * `name=value` pairs separated by commas (`a=5,b=0b11`; empty parts skipped) → register name →
 * value. Throws a RangeError naming the part that is not a pair with a value.
 */
export function parseRegisterValues(text: string): Map<string, bigint> {
	const m = new Map<string, bigint>();
	for (const part of text.split(',').filter(Boolean)) {
		const mm = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(\S+)\s*$/.exec(part);
		let v: bigint | null = null;
		if (mm) {
			try {
				v = parseRegisterValue(mm[2], mm[1]);
			} catch {
				v = null;
			}
		}
		if (!mm || v === null) throw new RangeError(`expected name=value pairs such as a=5,b=3, got "${part}"`);
		m.set(mm[1], v);
	}
	return m;
}
