// Register input values as the workbench accepts them: decimal, 0b binary, 0x hex; bounded by size.
export function parseInputValue(raw: string, name: string, size: number): bigint {
	const t = raw.trim().replace(/_/g, '');
	if (t === '') return 0n;
	let v: bigint;
	if (/^0b[01]+$/i.test(t)) v = BigInt(t);
	else if (/^[01]+b$/i.test(t)) v = BigInt('0b' + t.slice(0, -1));
	else if (/^0x[0-9a-f]+$/i.test(t)) v = BigInt(t);
	else if (/^\d+$/.test(t)) v = BigInt(t);
	else throw new RangeError(`${name}: "${raw}" is not a whole number (decimal, or binary as 0b101)`);
	if (v >= 1n << BigInt(size)) throw new RangeError(`${name}: ${v} does not fit in ${size} qubit${size === 1 ? '' : 's'} (at most ${(1n << BigInt(size)) - 1n})`);
	return v;
}
