/**
 * Work budgets: what one request may make the core do, counted as the work happens (not as a
 * count of input items, which a few nested calls multiply without bound). Every path that expands
 * a circuit — OpenQASM import, document validation, lowering, traces, exports — charges one
 * {@link WorkBudget} and stops with a {@link BudgetExceeded} that names where it stopped: a source
 * position (`line:column`) for files, a JSON path for documents.
 *
 * Numbers are bounded before arithmetic: {@link checkBits} takes an estimate of a result's size
 * in bits (from the operands' sizes) and refuses it before the big-integer operation runs.
 */

/** Named limits of a {@link WorkBudget}. */
export interface WorkLimits {
	/** Expanded calls: gate-definition calls in a file, user-block calls in a document (a call that makes no gate still counts). */
	calls: number;
	/** Gates produced after expansion. */
	gates: number;
	/** Qubits declared. */
	qubits: number;
	/** Items stored in a document (body and block bodies). */
	items: number;
}

/** Default work limits: 2 000 000 calls, 8 000 000 gates, 4096 qubits, 100 000 stored items. */
export const DEFAULT_WORK_LIMITS: WorkLimits = { calls: 2_000_000, gates: 8_000_000, qubits: 4096, items: 100_000 };

/**
 * Largest number (numerator or denominator) an expression may produce, in bits. Exact angles go
 * down to 1/2^4096 turn, so 8192 bits leaves room for their products; 3**4096 (6492 bits) passes,
 * (3**4096)**64 (about 415 000 bits) is refused before it is computed.
 */
export const MAX_NUMBER_BITS = 8192;

/** Where work stopped: a source position, or a JSON path of a document field. */
export type WorkSite = { line: number; column: number } | { path: string };

const NOUN: Record<keyof WorkLimits | 'bits', string> = {
	calls: 'calls after expanding definitions',
	gates: 'gates after expansion',
	qubits: 'qubits',
	items: 'stored items',
	bits: 'bits in one number'
};

/** A budget ran out. `site` is where (set by whoever knows it); `kind` which limit. */
export class BudgetExceeded extends RangeError {
	constructor(
		readonly kind: keyof WorkLimits | 'bits',
		readonly limit: number,
		readonly site: WorkSite | null,
		message?: string
	) {
		super(message ?? `more than ${limit.toLocaleString('en-US')} ${NOUN[kind]} (limit)`);
		this.name = 'BudgetExceeded';
	}
	/** The same error placed at `site` (keeps an existing site). */
	at(site: WorkSite): BudgetExceeded {
		return this.site ? this : new BudgetExceeded(this.kind, this.limit, site, this.message);
	}
	/** `line:column` or the JSON path, or '' when unplaced. */
	get where(): string {
		if (!this.site) return '';
		return 'path' in this.site ? this.site.path : `${this.site.line}:${this.site.column}`;
	}
}

/** Counts work against named limits; share one per request. */
export class WorkBudget {
	readonly limits: WorkLimits;
	readonly used: WorkLimits = { calls: 0, gates: 0, qubits: 0, items: 0 };
	constructor(limits: Partial<WorkLimits> = {}) {
		this.limits = { ...DEFAULT_WORK_LIMITS, ...limits };
	}
	/** Add `n` to `kind`; throws {@link BudgetExceeded} (placed at `site`) once over the limit. */
	charge(kind: keyof WorkLimits, n: number, site: WorkSite | null = null): void {
		this.used[kind] += n;
		if (this.used[kind] > this.limits[kind]) throw new BudgetExceeded(kind, this.limits[kind], site);
	}
	/** Would `n` more of `kind` go over? (Check before starting work you can size up front.) */
	wouldExceed(kind: keyof WorkLimits, n: number): boolean {
		return this.used[kind] + n > this.limits[kind];
	}
}

/** Size of |x| in bits (0 for 0), without converting the whole number to text for small ones. */
export function bitLength(x: bigint): number {
	if (x < 0n) x = -x;
	if (x < 9007199254740992n) return x === 0n ? 0 : Number(x).toString(2).length;
	const hex = x.toString(16);
	return (hex.length - 1) * 4 + (32 - Math.clz32(parseInt(hex[0], 16)));
}

/** Refuse a number whose estimated size `bits` is over {@link MAX_NUMBER_BITS}, before computing it. */
export function checkBits(bits: number, site: WorkSite | null = null): void {
	if (bits > MAX_NUMBER_BITS)
		throw new BudgetExceeded(
			'bits',
			MAX_NUMBER_BITS,
			site,
			`number too large: about ${bits > 1e6 ? `${(bits / 1e6).toPrecision(3)} million` : Math.round(bits).toLocaleString('en-US')} bits; the limit is ${MAX_NUMBER_BITS} bits per number`
		);
}

/** An integer for a message: its digits when short, else its size ("a 1234-digit number"). */
export function shortInteger(v: bigint): string {
	const bits = bitLength(v);
	if (bits <= 64) return v.toString();
	return `a ${Math.floor(bits * 0.30103) + 1}-digit number`;
}
