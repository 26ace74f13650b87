/**
 * Register maps: name registers over the qubits of an imported file. One entry is
 * `NAME=REG[INDEXSET]` (or `NAME=REG` for a whole register), the index set written as in
 * OpenQASM 3 (§ "Register concatenation and slicing"): `q[0:15]` (inclusive range),
 * `q[15:-1:0]` (start:step:end), `q[{3,1,2,0}]` (a set), `q[7]`. The qubits are listed from the
 * new register's least-significant bit: `x=q[15:-1:0]` makes q[15] bit 0 of x, i.e. the file
 * wrote x most-significant bit first.
 *
 * {@link applyRegisterMap} rewrites a document's gate qubit references into the mapped
 * registers. Registers of the file that no entry touches stay as they are; a register that entries
 * map only in part is refused, naming the qubits left over (the user names them, for example as
 * `work=q[8:9]`: an ancilla that silently became a register of its own would enter every check as
 * an input). The map is kept in the document (`registerMap`) for display and re-export.
 * {@link previewRegisterMap} and {@link reverseRegisterMapEntry} serve the upload form.
 * Pure; qubit order: index 0 = LSB.
 */
import type { BodyItem, CircuitDocument, QubitRef, RegisterSpec } from '../circuit.js';

/** One entry of a register map, as the user wrote it. */
export interface RegisterMapEntry {
	name: string;
	/** `REG`, `REG[i]`, `REG[a:b]`, `REG[a:s:b]` or `REG[{i,j,…}]` (OpenQASM 3 index syntax). */
	qubits: string;
}

/** A map entry that cannot be used; `field` is the entry (`x=q[0:15]`) or the flag / form field the caller names. */
export class RegisterMapError extends Error {
	constructor(
		readonly entry: number,
		message: string
	) {
		super(message);
		this.name = 'RegisterMapError';
	}
}

const IDENT = /^[A-Za-z_][A-Za-z0-9_]*$/;
const MAX_LISTED = 1 << 16;

/** Parse `NAME=QUBITS` (as given to `--register`). */
export function parseRegisterMapEntry(text: string, entry = 0): RegisterMapEntry {
	const eq = text.indexOf('=');
	if (eq < 0) throw new RegisterMapError(entry, `"${text}": expected NAME=QUBITS such as x=q[0:15], x=q[15:-1:0] or x=q[{3,1,2,0}]`);
	const name = text.slice(0, eq).trim();
	const qubits = text.slice(eq + 1).trim();
	if (!IDENT.test(name)) throw new RegisterMapError(entry, `"${text}": register name "${name}" must be an identifier (letters, digits, _; not starting with a digit)`);
	if (!qubits) throw new RegisterMapError(entry, `"${text}": nothing after "="; expected the qubits, such as q[0:15]`);
	return { name, qubits };
}

/** The file register and index list an entry names (LSB first); checks ranges against `registers`. */
export function resolveRegisterMapEntry(e: RegisterMapEntry, registers: readonly RegisterSpec[], entry = 0): { source: string; indices: number[] } {
	const where = `${e.name}=${e.qubits}`;
	const m = /^([A-Za-z_][A-Za-z0-9_]*)\s*(?:\[(.*)\])?$/s.exec(e.qubits);
	if (!m) throw new RegisterMapError(entry, `"${where}": expected REG, REG[i], REG[a:b], REG[a:step:b] or REG[{i,j,…}]`);
	const source = m[1];
	const reg = registers.find((r) => r.name === source);
	if (!reg) throw new RegisterMapError(entry, `"${where}": the file has no register "${source}"; it has ${registers.map((r) => `${r.name}[${r.size}]`).join(', ')}`);
	const inside = m[2];
	if (inside === undefined) return { source, indices: Array.from({ length: reg.size }, (_, i) => i) };
	const int = (s: string, what: string): number => {
		const t = s.trim();
		if (!/^-?\d+$/.test(t)) throw new RegisterMapError(entry, `"${where}": ${what} "${t}" is not an integer`);
		return Number(t);
	};
	const check = (i: number) => {
		if (i < 0 || i >= reg.size) throw new RegisterMapError(entry, `"${where}": index ${i} is out of range for ${source}[${reg.size}]; expected 0..${reg.size - 1}`);
		return i;
	};
	const body = inside.trim();
	let indices: number[];
	if (body.startsWith('{')) {
		if (!body.endsWith('}')) throw new RegisterMapError(entry, `"${where}": a set must end with "}"`);
		indices = body
			.slice(1, -1)
			.split(',')
			.map((x) => check(int(x, 'index')));
	} else if (body.includes(':')) {
		const parts = body.split(':');
		if (parts.length > 3) throw new RegisterMapError(entry, `"${where}": a range is start:end or start:step:end`);
		const start = check(int(parts[0], 'range start'));
		const step = parts.length === 3 ? int(parts[1], 'range step') : start <= int(parts[parts.length - 1], 'range end') ? 1 : -1;
		const end = check(int(parts[parts.length - 1], 'range end'));
		if (step === 0) throw new RegisterMapError(entry, `"${where}": the range step must not be 0`);
		if ((end - start) * step < 0) throw new RegisterMapError(entry, `"${where}": the range ${start}:${step}:${end} is empty; for most-significant bit first write ${start}:${-step}:${end}`);
		indices = [];
		// OpenQASM 3 ranges include their end.
		for (let i = start; step > 0 ? i <= end : i >= end; i += step) {
			indices.push(i);
			if (indices.length > MAX_LISTED) break;
		}
	} else indices = [check(int(body, 'index'))];
	const seen = new Set<number>();
	for (const i of indices) {
		if (seen.has(i)) throw new RegisterMapError(entry, `"${where}": ${source}[${i}] is listed twice`);
		seen.add(i);
	}
	return { source, indices };
}

/**
 * Rewrite an imported document into the mapped registers (see the module comment). Throws
 * {@link RegisterMapError} (with the entry's position) for unknown registers, out-of-range or
 * repeated indices, qubits in two entries, names that clash, and (unless `unmapped: 'keep'`, which
 * puts them in `REG_rest`) qubits of a partly mapped register that no entry names.
 */
export function applyRegisterMap(
	doc: CircuitDocument,
	entries: readonly RegisterMapEntry[],
	options: { unmapped?: 'refuse' | 'keep' } = {}
): { document: CircuitDocument; notes: string[] } {
	if (entries.length === 0) return { document: doc, notes: [] };
	const regs = doc.registers;
	const owner = new Map<string, { entry: number; to: QubitRef }>();
	const newRegs: RegisterSpec[] = [];
	const names = new Set<string>();
	const touched = new Set<string>();
	entries.forEach((e, k) => {
		if (names.has(e.name)) throw new RegisterMapError(k, `"${e.name}=${e.qubits}": register "${e.name}" is mapped twice`);
		names.add(e.name);
		const { source, indices } = resolveRegisterMapEntry(e, regs, k);
		touched.add(source);
		indices.forEach((i, bit) => {
			const key = `${source}[${i}]`;
			const prev = owner.get(key);
			if (prev) throw new RegisterMapError(k, `"${e.name}=${e.qubits}": ${key} is already bit ${prev.to.index} of "${prev.to.register}" (${entries[prev.entry].name}=${entries[prev.entry].qubits}); registers must not overlap`);
			owner.set(key, { entry: k, to: { register: e.name, index: bit } });
		});
		const srcSize = regs.find((r) => r.name === source)!.size;
		const role = regs.find((r) => r.name === source)?.role;
		newRegs.push({ name: e.name, size: indices.length, ...(role && indices.length === srcSize ? { role } : {}) });
	});
	const notes: string[] = [];
	for (const r of regs) {
		if (!touched.has(r.name)) {
			if (names.has(r.name)) throw new RegisterMapError(entries.findIndex((e) => e.name === r.name), `register name "${r.name}" is taken by the file's own ${r.name}[${r.size}], which no entry maps; choose another name`);
			newRegs.push({ ...r });
			for (let i = 0; i < r.size; i++) owner.set(`${r.name}[${i}]`, { entry: -1, to: { register: r.name, index: i } });
			continue;
		}
		const left: number[] = [];
		for (let i = 0; i < r.size; i++) if (!owner.has(`${r.name}[${i}]`)) left.push(i);
		if (!left.length) continue;
		if (options.unmapped !== 'keep') throw new RegisterMapError(-1, unmappedMessage(r.name, left, names));
		// Kept (for OpenQASM 3 `let` aliases, the file's own names): a remainder register REG_rest.
		let rest = `${r.name}_rest`;
		for (let k = 2; names.has(rest) || regs.some((x) => x.name === rest && !touched.has(x.name)); k++) rest = `${r.name}_rest${k}`;
		names.add(rest);
		left.forEach((i, bit) => owner.set(`${r.name}[${i}]`, { entry: -1, to: { register: rest, index: bit } }));
		newRegs.push({ name: rest, size: left.length });
		notes.push(`${left.length} qubit${left.length === 1 ? '' : 's'} of ${r.name} in no let alias (${compact(r.name, left)}) kept as ${rest}[${left.length}]`);
	}
	const mapRef = (q: QubitRef, where: string): QubitRef => {
		const o = owner.get(`${q.register}[${q.index}]`);
		if (!o) throw new RegisterMapError(-1, `${where}: qubit ${q.register}[${q.index}] is not in the file's registers`);
		return { ...o.to };
	};
	// Gate items are relabelled; calls of parameterless blocks (the importer's compact broadcasts)
	// stay, and those blocks' gates are relabelled the same way.
	const body: BodyItem[] = doc.body.map((item, k) => {
		if (item.type === 'gate') return { ...item, qubits: item.qubits.map((q) => mapRef(q, `body[${k}]`)) };
		if (item.type === 'call' && Object.keys(item.args).length === 0) return item;
		throw new RegisterMapError(-1, `body[${k}] is a ${item.type} block; register maps apply to gate lists read from OpenQASM files`);
	});
	const blocks = doc.blocks?.map((b) => {
		if (b.params.length) throw new RegisterMapError(-1, `block ${b.name} has parameters; register maps apply to gate lists read from OpenQASM files`);
		return {
			...b,
			body: b.body.map((item, k) => {
				if (item.type !== 'gate') throw new RegisterMapError(-1, `block ${b.name} body[${k}] is a ${item.type} block; register maps apply to gate lists read from OpenQASM files`);
				return { ...item, qubits: item.qubits.map((q) => mapRef(q, `block ${b.name} body[${k}]`)) };
			})
		};
	});
	return {
		document: { ...doc, registers: newRegs, body, ...(blocks ? { blocks } : {}), registerMap: entries.map((e) => ({ name: e.name, qubits: e.qubits })) },
		notes
	};
}

function compact(name: string, idx: number[]): string {
	const parts: string[] = [];
	for (let i = 0; i < idx.length; ) {
		let j = i;
		while (j + 1 < idx.length && idx[j + 1] === idx[j] + 1) j++;
		parts.push(j > i ? `${idx[i]}:${idx[j]}` : `${idx[i]}`);
		i = j + 1;
	}
	return `${name}[${parts.join(',')}]`;
}

/** The index set of `indices` as written in an entry: `a:b`, `a:-1:b`, `a:s:b`, `i` or `{i,j,…}`. */
export function indexSetText(indices: readonly number[]): string {
	if (indices.length === 1) return `${indices[0]}`;
	const step = indices[1] - indices[0];
	const progression = step !== 0 && indices.every((v, k) => k === 0 || v - indices[k - 1] === step);
	if (!progression) return `{${indices.join(',')}}`;
	const first = indices[0];
	const last = indices[indices.length - 1];
	return step === 1 ? `${first}:${last}` : `${first}:${step}:${last}`;
}

function unmappedMessage(register: string, left: number[], taken: ReadonlySet<string>): string {
	let name = 'work';
	for (let k = 2; taken.has(name); k++) name = `work${k}`;
	const them = left.length === 1 ? `${register}[${left[0]}] is` : `${left.length} qubits of ${register} (${compact(register, left)}) are`;
	return `${them} in no mapped register; name ${left.length === 1 ? 'it' : 'them'} too, for example ${name}=${register}[${indexSetText(left)}] for an ancilla or work register`;
}

/**
 * The same qubits listed in the opposite order (bit 0 becomes the last): the "reverse bit order"
 * of the upload form. Throws {@link RegisterMapError} as {@link resolveRegisterMapEntry} does.
 */
export function reverseRegisterMapEntry(e: RegisterMapEntry, registers: readonly RegisterSpec[]): RegisterMapEntry {
	const { source, indices } = resolveRegisterMapEntry(e, registers);
	return { name: e.name, qubits: `${source}[${indexSetText([...indices].reverse())}]` };
}

/** One file qubit in the upload form's preview: which register and bit it becomes (null: none yet). */
export interface RegisterMapPreviewRow {
	/** `q[3]`, as the file names it. */
	file: string;
	register: string | null;
	bit: number | null;
}

/**
 * What a map (entries as typed, blank ones ignored) makes of a file's registers, without
 * throwing: per file qubit its new register and bit, a message per entry that cannot be used
 * (same wording as {@link applyRegisterMap}), and the message for qubits left unnamed (null when
 * none). Qubit order: rows in file order, bits LSB first.
 */
export function previewRegisterMap(registers: readonly RegisterSpec[], texts: readonly string[]): { rows: RegisterMapPreviewRow[]; errors: (string | null)[]; unmapped: string | null } {
	const owner = new Map<string, { register: string; bit: number }>();
	const errors: (string | null)[] = texts.map(() => null);
	const names = new Map<string, number>();
	const touched = new Set<string>();
	texts.forEach((text, k) => {
		if (!text.trim()) return;
		try {
			const e = parseRegisterMapEntry(text.trim(), k);
			if (names.has(e.name)) throw new RegisterMapError(k, `"${e.name}=${e.qubits}": register "${e.name}" is mapped twice`);
			const { source, indices } = resolveRegisterMapEntry(e, registers, k);
			for (const i of indices) {
				const prev = owner.get(`${source}[${i}]`);
				if (prev) throw new RegisterMapError(k, `"${e.name}=${e.qubits}": ${source}[${i}] is already bit ${prev.bit} of "${prev.register}"; registers must not overlap`);
			}
			names.set(e.name, k);
			touched.add(source);
			indices.forEach((i, bit) => owner.set(`${source}[${i}]`, { register: e.name, bit }));
		} catch (err) {
			if (!(err instanceof RegisterMapError)) throw err;
			errors[k] = err.message;
		}
	});
	const rows: RegisterMapPreviewRow[] = [];
	let unmapped: string | null = null;
	for (const r of registers) {
		const left: number[] = [];
		for (let i = 0; i < r.size; i++) {
			const o = owner.get(`${r.name}[${i}]`);
			if (o) rows.push({ file: `${r.name}[${i}]`, register: o.register, bit: o.bit });
			else if (touched.has(r.name)) {
				rows.push({ file: `${r.name}[${i}]`, register: null, bit: null });
				left.push(i);
			} else rows.push({ file: `${r.name}[${i}]`, register: r.name, bit: i });
		}
		if (left.length && unmapped === null) unmapped = unmappedMessage(r.name, left, new Set(names.keys()));
		if (!touched.has(r.name) && names.has(r.name) && errors[names.get(r.name)!] === null)
			errors[names.get(r.name)!] = `register name "${r.name}" is taken by the file's own ${r.name}[${r.size}], which no entry maps; choose another name`;
	}
	return { rows, errors, unmapped };
}
