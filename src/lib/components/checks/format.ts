// Words for server checks, shared by the status component and the tables.

/** 1 048 576 with thin spaces, as the tables print numbers. */
export function count(n: number): string {
	return Math.round(n).toLocaleString('en-GB').replace(/,/g, '\u2009');
}

export function seconds(s: number): string {
	if (s < 60) return `${Math.max(1, Math.round(s))} s`;
	const m = Math.floor(s / 60);
	return `${m} min ${Math.round(s - 60 * m)} s`;
}

/** What a method string means, in words ("sweep+proof" → "proof and exhaustive sweep"). */
export function methodWords(method: string | null, exhaustive: boolean): string {
	if (!method) return 'check';
	const sweep = exhaustive ? 'exhaustive sweep' : 'sampled sweep (not every input)';
	return method.endsWith('+proof') ? `proof and ${sweep}` : sweep;
}
