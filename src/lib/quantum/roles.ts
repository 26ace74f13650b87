/**
 * Register roles a circuit's specs imply. A register a spec line assigns (`b = …`) is an output;
 * one that specs only read is an input. Only registers without a stated role (or the default
 * "work", which is what imports give every register) take the implied role: a role a person chose
 * (ancilla, or input/output set by hand) is kept. Spec lines that do not parse are skipped: the
 * Spec panel reports them on its own.
 */
import type { RegisterRole, RegisterSpec } from './circuit.js';
import { parseSpec } from './check/spec.js';

export interface ImpliedRoles {
	registers: RegisterSpec[];
	/** "b: output" for each register whose role changed, in register order. */
	changed: string[];
}

export function rolesFromSpecs(registers: readonly RegisterSpec[], specs: readonly string[]): ImpliedRoles {
	const outputs = new Set<string>();
	const reads = new Set<string>();
	for (const text of specs) {
		try {
			const s = parseSpec(text, registers as RegisterSpec[]);
			outputs.add(s.out);
			for (const r of s.reads) reads.add(r);
		} catch {
			// reported by the Spec panel
		}
	}
	const changed: string[] = [];
	const next = registers.map((r) => {
		if (r.role && r.role !== 'work') return r;
		const role: RegisterRole | null = outputs.has(r.name) ? 'output' : reads.has(r.name) ? 'input' : null;
		if (!role) return r;
		changed.push(`${r.name}: ${role}`);
		return { ...r, role };
	});
	return { registers: next, changed };
}
