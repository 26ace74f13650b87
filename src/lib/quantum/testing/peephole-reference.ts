/**
 * The plain reference of `peephole.ts` (the gate-object version it was written as first): the
 * same rules, one object per gate, no shortcuts. Only the tests use it, comparing the fast
 * version against it on random and hand-written gate lists (STYLE.md: keep a plain reference
 * kernel that the tests compare the fast one against). Change both together.
 */
import { addAngles, scaleAngle, type Angle } from '../angle.js';
import type { BodyItem, CircuitDocument, GateItem, QubitRef } from '../circuit.js';
import { angleString, EIGHTH, expandProduct, isZero, MINUS_EIGHTH, readAngle, sameSet, TOFFOLI, xorSorted, type PeepholeOptions, type PeepholeReport, type PeepholeResult, type ToffoliStep } from '../qasm/peephole.js';

type Kind = 'diag' | 'cx' | 'h' | 'other' | 'barrier';
interface G {
	item: BodyItem;
	kind: Kind;
	qs: number[];
	/** Diagonal gates: the angle in turns (rz read as p). */
	angle?: Angle;
	/** Made by a region rewrite (only pairs with at least one such gate are cancelled). */
	made?: boolean;
}

/**
 * Rewrite decomposed controlled phases, doubly controlled phases and Toffolis in `doc.body` to
 * their native gates (exact up to a global phase). Pure; the document is not changed.
 */
export function recogniseDecompositionsReference(doc: CircuitDocument, options: PeepholeOptions = {}): PeepholeResult {
	const maxRegion = options.maxRegion ?? 512;
	const report: PeepholeReport = { regions: 0, toffolis: 0, toffoliPhases: 0, cancelledPairs: 0, rzAsPhase: 0, stoppedAtLimit: false };
	// Qubit ids are flat positions (register offset + index), so sorting them sorts by register, then index.
	const offsets = new Map<string, number>();
	const sizes = new Map(doc.registers.map((r) => [r.name, r.size]));
	let total = 0;
	for (const r of doc.registers) {
		offsets.set(r.name, total);
		total += r.size;
	}
	const refs: QubitRef[] = [];
	for (const r of doc.registers) for (let i = 0; i < r.size; i++) refs.push({ register: r.name, index: i });
	const qid = (r: QubitRef): number => (offsets.get(r.register) ?? 0) + (r.index as number);
	const known = (r: QubitRef) => {
		const size = sizes.get(r.register);
		return size !== undefined && typeof r.index === 'number' && r.index >= 0 && r.index < size;
	};
	const gs: G[] = doc.body.map((item) => classify(item, qid, known));
	let work = 0;
	const maxWork = options.maxWork ?? 40 * gs.length + 100_000;

	// 2. Toffolis first: a CNOT region would otherwise take their middle apart.
	const removed = new Uint8Array(gs.length);
	for (let i = 0; i < gs.length && !report.stoppedAtLimit; i++) {
		if (gs[i].kind !== 'h' || removed[i]) continue;
		const m = matchToffoli(gs, removed, i);
		work += m ? m.visited : 8;
		if (work > maxWork) report.stoppedAtLimit = true;
		if (!m) continue;
		const [a, b, c] = m.roles;
		const first = gs[m.matched[0]].item;
		const lines = m.matched.map((k) => gs[k].item.source?.line).filter((x): x is number => x !== undefined);
		const ccx: GateItem = {
			id: `${first.id}t`,
			type: 'gate',
			gate: 'ccx',
			qubits: [refs[a], refs[b], refs[c]].map((r) => ({ ...r })),
			...(first.source ? { source: first.source } : {}),
			label: lines.length ? `Toffoli written out (lines ${Math.min(...lines)}–${Math.max(...lines)})` : 'Toffoli written out'
		};
		for (const k of m.matched.slice(1)) removed[k] = 1;
		gs[m.matched[0]] = { item: ccx, kind: 'other', qs: [a, b, c] };
		report.toffolis++;
	}

	// 4. Toffoli pairs around phases on their target: ccx(a,b,n) · D · ccx(a,b,n).
	const pairs = toffoliPhases(gs, removed, refs, maxRegion, report);
	work += pairs.visited;
	if (work > maxWork) report.stoppedAtLimit = true;
	const gs1: G[] = [];
	const orig: number[] = [];
	for (let i = 0; i < gs.length; i++) {
		if (removed[i]) continue;
		for (const g of pairs.rewrite.get(i) ?? [gs[i]]) {
			gs1.push(g);
			orig.push(i);
		}
	}
	const removed1 = new Uint8Array(gs1.length);

	// 1. CNOT regions.
	// The rewritten list as two parallel arrays (no object per gate).
	const outG: G[] = [];
	const outFrom: number[] = [];
	for (let i = 0; i < gs1.length; ) {
		if (gs1[i].kind === 'cx' && !report.stoppedAtLimit) {
			const r = tryRegion(gs1, removed1, i, maxRegion, refs);
			work += r.visited;
			if (work > maxWork) report.stoppedAtLimit = true;
			if (r.ok) {
				report.regions++;
				report.rzAsPhase += r.rz;
				for (let k = i; k <= r.end; k++) {
					const rep = r.rewrite.get(k);
					if (rep === undefined) {
						outG.push(gs1[k]);
						outFrom.push(orig[k]);
					}
					else
						for (const g of rep) {
							outG.push(g);
							outFrom.push(orig[k]);
						}
				}
				i = r.end + 1;
				continue;
			}
		}
		outG.push(gs1[i]);
		outFrom.push(orig[i]);
		i++;
	}

	// 3. Cancel exact pairs: a gate and the next gate touching its qubits (skipping only gates made
	// from the same source item as either), so a leftover stays next to the line that caused it.
	// Repeated (a few passes) so that a pair whose neighbours cancel later in the list still meets.
	const gone = new Uint8Array(outG.length);
	for (let pass = 0, changed = true; changed && pass < 6; pass++) {
		changed = false;
		for (let i = 0; i < outG.length; i++) {
			const gi = outG[i];
			if (gone[i] || gi.kind !== 'diag' || !gi.angle!.exact) continue;
			const set = gi.qs;
			for (let j = i + 1, seen = 0; j < outG.length && seen < 256; j++) {
				if (gone[j]) continue;
				const gj = outG[j];
				seen++;
				if (gj.kind === 'barrier') break;
				if (!overlaps(gj.qs, set)) continue;
				if (gj.kind === 'diag' && (gi.made || gj.made) && gj.angle!.exact && sameSet(gj.qs, set) && isZero(addAngles(gi.angle!, gj.angle!))) {
					gone[i] = gone[j] = 1;
					changed = true;
					report.cancelledPairs++;
					for (const x of [gi, gj]) if ((x.item as GateItem).gate === 'rz') report.rzAsPhase++;
					break;
				}
				// Siblings (diagonal, made from one source gate) commute with gi and may be stepped over.
				if (gj.kind === 'diag' && gj.made && (outFrom[j] === outFrom[i] || (j + 1 < outG.length && outFrom[j + 1] === outFrom[j]) || (j > 0 && outFrom[j - 1] === outFrom[j]))) continue;
				break;
			}
		}
	}
	const body: BodyItem[] = [];
	const from: number[] = [];
	for (let k = 0; k < outG.length; k++) {
		if (gone[k]) continue;
		body.push(outG[k].item);
		from.push(outFrom[k]);
	}
	return { body, from, report };
}

/** Whether two short qubit lists share a qubit (plain loops: this runs for every pair tried). */
function overlaps(a: number[], b: number[]): boolean {
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) if (a[i] === b[j]) return true;
	return false;
}

function classify(item: BodyItem, qid: (r: QubitRef) => number, known: (r: QubitRef) => boolean): G {
	if (item.type !== 'gate' || item.qubits.some((q) => typeof q.index !== 'number' || !known(q))) return { item, kind: 'barrier', qs: [] };
	const qs = item.qubits.map(qid);
	switch (item.gate) {
		case 'p':
		case 'cp':
		case 'mcp':
		case 'rz':
			return { item, kind: 'diag', qs, angle: readAngle(item.angle ?? '0 turn') };
		case 'cx':
			return { item, kind: 'cx', qs };
		case 'h':
			return { item, kind: 'h', qs };
		default:
			return { item, kind: 'other', qs };
	}
}

// ----------------------------------------------------------------------------------------------
// Rule 1: CNOT regions

interface RegionResult {
	ok: boolean;
	end: number;
	visited: number;
	rz: number;
	rewrite: Map<number, G[]>;
}

const MAX_PARITY = 8;

function tryRegion(gs: G[], removed: Uint8Array, start: number, maxRegion: number, refs: QubitRef[]): RegionResult {
	// Parities of the qubits changed so far (absent = the qubit holds its own start value).
	const parity = new Map<number, number[]>();
	const rewrite = new Map<number, G[]>();
	let visited = 0;
	let rz = 0;
	const fail = (): RegionResult => ({ ok: false, end: start, visited, rz: 0, rewrite });
	const inDirty = (q: number) => {
		if (parity.has(q)) return true;
		for (const p of parity.values()) if (p.includes(q)) return true;
		return false;
	};
	for (let k = start; k < gs.length && k < start + maxRegion; k++) {
		if (removed[k]) continue;
		visited++;
		const g = gs[k];
		if (g.kind === 'cx') {
			const [c, t] = g.qs;
			const pc = parity.get(c) ?? [c];
			const pt = parity.get(t) ?? [t];
			const nt = xorSorted(pt, pc);
			if (nt.length > MAX_PARITY) return fail();
			if (nt.length === 1 && nt[0] === t) parity.delete(t);
			else parity.set(t, nt);
			rewrite.set(k, []);
			if (parity.size === 0) return { ok: true, end: k, visited, rz, rewrite };
			continue;
		}
		if (g.kind === 'diag') {
			if (!g.qs.some((q) => parity.has(q))) continue;
			const item = g.item as GateItem;
			const terms = expandProduct(g.qs.map((q) => parity.get(q) ?? [q]));
			if (terms === null) return fail();
			const target = g.qs[g.qs.length - 1];
			const made: G[] = [];
			let n = 0;
			for (const [mono, coef] of terms) {
				const a = scaleAngle(g.angle!, coef);
				if (isZero(a)) continue;
				const qs = [...mono].sort((x, y) => (x === target ? 1 : y === target ? -1 : x - y));
				const gate = qs.length === 1 ? 'p' : qs.length === 2 ? 'cp' : 'mcp';
				const it: GateItem = {
					id: `${item.id}r${++n}`,
					type: 'gate',
					gate,
					qubits: qs.map((q) => ({ ...refs[q] })),
					angle: angleString(a),
					...(item.source ? { source: item.source } : {}),
					label: `${gate} from a ${item.gate} between CNOTs`
				};
				made.push({ item: it, kind: 'diag', qs, angle: a, made: true });
			}
			if (item.gate === 'rz') rz++;
			rewrite.set(k, made);
			continue;
		}
		// Any other gate may stay inside the region only if it touches no changed qubit and no
		// qubit a changed one depends on: then it acts on the same values with or without the CNOTs.
		if (g.kind === 'barrier' || g.qs.some(inDirty)) return fail();
	}
	return fail();
}

// ----------------------------------------------------------------------------------------------
// Rule 4: a Toffoli pair around phases on its target

/**
 * ccx(a,b,n) · D · ccx(a,b,n), where every gate between the two Toffolis that touches a, b or n is
 * a diagonal gate on a set S ∋ n without a or b, is diagonal: n holds n ⊕ ab in between, and
 * θ·∏(S∖n)·(n ⊕ ab) = θ·∏S + θ·∏(S∖n)·ab − 2θ·∏S·ab (exact for 0/1 values). Each such gate
 * becomes those three monomial phases at its own place; the Toffolis go. With n at 0 the first
 * and last vanish and what is left is the doubly controlled phase on (a, b, S∖n); with n at 1 the
 * circuit really does something else, and the kept terms say so to the engines and the prover.
 */
function toffoliPhases(gs: G[], removed: Uint8Array, refs: QubitRef[], maxRegion: number, report: PeepholeReport): { rewrite: Map<number, G[]>; visited: number } {
	const rewrite = new Map<number, G[]>();
	let visited = 0;
	const isCcx = (g: G) => g.kind === 'other' && (g.item as GateItem).gate === 'ccx';
	for (let i = 0; i < gs.length; i++) {
		if (removed[i] || rewrite.has(i) || !isCcx(gs[i])) continue;
		const [a, b, n] = gs[i].qs;
		const inside: number[] = [];
		let end = -1;
		for (let k = i + 1; k < gs.length && k <= i + maxRegion; k++) {
			if (removed[k]) continue;
			visited++;
			const g = gs[k];
			if (g.kind === 'barrier') break;
			if (!g.qs.includes(a) && !g.qs.includes(b) && !g.qs.includes(n)) continue;
			if (isCcx(g) && g.qs[2] === n && sameSet(g.qs.slice(0, 2), [a, b])) {
				end = k;
				break;
			}
			if (g.kind === 'diag' && g.qs.includes(n) && !g.qs.includes(a) && !g.qs.includes(b) && !rewrite.has(k)) {
				inside.push(k);
				continue;
			}
			break;
		}
		if (end < 0 || inside.length === 0) continue;
		for (const k of inside) {
			const g = gs[k];
			const item = g.item as GateItem;
			const rest = g.qs.filter((q) => q !== n);
			const target = rest.length ? rest[rest.length - 1] : n;
			const terms: [number[], Angle][] = [
				[g.qs, g.angle!],
				[[...rest, a, b], g.angle!],
				[[...g.qs, a, b], scaleAngle(g.angle!, -2n)]
			];
			const made: G[] = [];
			let m = 0;
			for (const [set, angle] of terms) {
				if (isZero(angle)) continue;
				const qs = [...set].sort((x, y) => (x === target ? 1 : y === target ? -1 : x - y));
				const gate = qs.length === 1 ? 'p' : qs.length === 2 ? 'cp' : 'mcp';
				made.push({
					item: {
						id: `${item.id}a${++m}`,
						type: 'gate',
						gate,
						qubits: qs.map((q) => ({ ...refs[q] })),
						angle: angleString(angle),
						...(item.source ? { source: item.source } : {}),
						label: `${gate} from a ${item.gate} between Toffolis onto ${refs[n].register}[${refs[n].index}]`
					},
					kind: 'diag',
					qs,
					angle,
					made: true
				});
			}
			if (item.gate === 'rz') report.rzAsPhase++;
			rewrite.set(k, made);
		}
		rewrite.set(i, []);
		rewrite.set(end, []);
		report.toffoliPhases++;
	}
	return { rewrite, visited };
}

// ----------------------------------------------------------------------------------------------
// Rule 2: the Toffoli network of Nielsen & Chuang Fig. 4.9 / qelib1.inc `ccx`

function stepMatches(g: G, s: ToffoliStep, roles: (number | undefined)[]): (number | undefined)[] | null {
	const item = g.item as GateItem;
	if (s.kind === 'h' || s.kind === 'cx') {
		if (g.kind !== s.kind) return null;
	} else {
		if (g.kind !== 'diag' || g.qs.length !== 1 || (item.gate !== 'p' && item.gate !== 'rz')) return null;
		const want = s.kind === 't' ? EIGHTH : MINUS_EIGHTH;
		if (!g.angle!.exact || g.angle!.num !== want.num || g.angle!.exp !== want.exp) return null;
	}
	const next = [...roles];
	for (let k = 0; k < s.q.length; k++) {
		const role = s.q[k];
		const q = g.qs[k];
		if (next[role] === undefined) {
			if (next.includes(q)) return null;
			next[role] = q;
		} else if (next[role] !== q) return null;
	}
	return next;
}

function matchToffoli(gs: G[], removed: Uint8Array, start: number): { roles: [number, number, number]; matched: number[]; visited: number } | null {
	let roles: (number | undefined)[] = [undefined, undefined, gs[start].qs[0]];
	const matched: number[] = [start];
	let k = start + 1;
	let visited = 1;
	for (let gi = 1; gi < TOFFOLI.length; gi++) {
		const pending = [...TOFFOLI[gi]];
		while (pending.length) {
			// The next gate touching a bound qubit must be one of the group's steps.
			let found = -1;
			for (; k < gs.length && visited < 4096; k++) {
				if (removed[k]) continue;
				visited++;
				const g = gs[k];
				if (g.kind === 'barrier') return null;
				if (g.qs.some((q) => roles.includes(q))) {
					found = k;
					break;
				}
			}
			if (found < 0) return null;
			let ok = false;
			for (let s = 0; s < pending.length; s++) {
				const r = stepMatches(gs[found], pending[s], roles);
				if (r) {
					roles = r;
					pending.splice(s, 1);
					ok = true;
					break;
				}
			}
			if (!ok) return null;
			matched.push(found);
			k = found + 1;
		}
	}
	const bound = roles as [number, number, number];
	// Gates between the first and last matched that were skipped must not touch the three qubits.
	const set = new Set(matched);
	for (let j = start; j <= matched[matched.length - 1]; j++) {
		if (removed[j] || set.has(j)) continue;
		if (gs[j].qs.some((q) => bound.includes(q))) return null;
	}
	return { roles: bound, matched, visited };
}
