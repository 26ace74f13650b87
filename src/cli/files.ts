// What every command of the CLI shares: reading arguments and circuit files.
import { importQasm } from '../lib/quantum/qasm/import.js';
import { applyRegisterMap, parseRegisterMapEntry, RegisterMapError, type RegisterMapEntry } from '../lib/quantum/qasm/register-map.js';
import { readCircuitDocument } from '../lib/quantum/schema.js';
import type { CircuitDocument } from '../lib/quantum/circuit.js';
import { parseRegisterValues } from '../lib/quantum/inputs.js';

/** An unusable command line or file: printed as it is, exit code 2. */
export class CliError extends Error {}

/** `name=value` pairs of the option `what` (`--input a=5,b=3`), through the core's one parser. */
export function readRegisterValues(text: string, what: string): Map<string, bigint> {
	try {
		return parseRegisterValues(text);
	} catch (e) {
		throw new CliError(`${what}: ${(e as Error).message}`);
	}
}

export interface Args {
	positional: string[];
	flags: Map<string, string[]>;
}

/** `--name value` or `--name=value` for the `valued` options (repeatable), `--json`, `--help` and the `switches`. */
export function parseArgs(argv: string[], valued: ReadonlySet<string>, switches: ReadonlySet<string> = new Set()): Args {
	const positional: string[] = [];
	const flags = new Map<string, string[]>();
	for (let i = 0; i < argv.length; i++) {
		const a = argv[i];
		if (a.startsWith('--')) {
			const [k, inline] = a.includes('=') && !valued.has(a) ? [a.slice(0, a.indexOf('=')), a.slice(a.indexOf('=') + 1)] : [a, undefined];
			if (valued.has(k)) {
				const v = inline ?? argv[++i];
				if (v === undefined) throw new CliError(`${k} needs a value`);
				flags.set(k, [...(flags.get(k) ?? []), v]);
			} else if (k === '--json' || k === '--help' || switches.has(k)) flags.set(k, ['1']);
			else throw new CliError(`unknown option ${k}`);
		} else positional.push(a);
	}
	return { positional, flags };
}

/** The options every command that reads a circuit file accepts. */
export const FILE_OPTIONS = ['--register', '--exact-decimals', '--param'] as const;

/** How to read a circuit file: register maps (`--register x=q[0:3]`) and printed decimals (`--exact-decimals on|off`). */
export interface ReadOptions {
	registers?: string[];
	exactDecimals?: boolean;
	/** OpenQASM 3 `input` values: name → expression (`--param theta=pi/8`). */
	params?: Record<string, string>;
}

/** {@link ReadOptions} from parsed arguments; a bad value names its flag. */
export function readOptionsFrom(args: Args): ReadOptions {
	const d = args.flags.get('--exact-decimals')?.at(-1);
	if (d !== undefined && d !== 'on' && d !== 'off') throw new CliError(`--exact-decimals must be on or off, got "${d}"`);
	const params: Record<string, string> = {};
	for (const t of args.flags.get('--param') ?? []) {
		const m = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=(.+)$/s.exec(t);
		if (!m) throw new CliError(`--param "${t}": expected NAME=VALUE such as theta=pi/8`);
		if (m[1] in params) throw new CliError(`--param ${m[1]} is given twice`);
		params[m[1]] = m[2].trim();
	}
	return { registers: args.flags.get('--register') ?? [], exactDecimals: d !== 'off', params };
}

/**
 * Read a circuit file: `.json` is an Orrery document, anything else OpenQASM (version from
 * its header; `.qasm3` assumes 3 without one). Warnings, notes (how decimals and decomposed gates
 * were read, registers left unmapped) and gate-definition lines come along.
 */
export function loadCircuitFile(
	path: string,
	readFile: (p: string) => string,
	options: ReadOptions = {}
): { doc: CircuitDocument; warnings: string[]; notes: string[]; definitionLines?: Map<string, number[]> } {
	const entries: RegisterMapEntry[] = [];
	(options.registers ?? []).forEach((t, k) => {
		try {
			entries.push(parseRegisterMapEntry(t, k));
		} catch (e) {
			if (e instanceof RegisterMapError) throw new CliError(`--register ${e.message}`);
			throw e;
		}
	});
	const mapped = (doc: CircuitDocument): { document: CircuitDocument; notes: string[] } => {
		try {
			return applyRegisterMap(doc, entries);
		} catch (e) {
			if (e instanceof RegisterMapError) throw new CliError(`--register ${e.entry >= 0 ? '' : `(${path}) `}${e.message}`);
			throw e;
		}
	};
	let text: string;
	try {
		text = readFile(path);
	} catch (e) {
		throw new CliError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
	}
	if (path.toLowerCase().endsWith('.json')) {
		let json: unknown;
		try {
			json = JSON.parse(text);
		} catch (e) {
			throw new CliError(`${path}:1:1: not valid JSON (${(e as Error).message})`);
		}
		let doc: CircuitDocument;
		try {
			doc = readCircuitDocument(json);
		} catch (e) {
			throw new CliError(`${path}: ${(e as Error).message}`);
		}
		const m = mapped(doc);
		return { doc: m.document, warnings: [], notes: m.notes };
	}
	const r = importQasm(text, { file: path, defaultVersion: path.toLowerCase().endsWith('.qasm3') ? 3 : 2, exactDecimals: options.exactDecimals ?? true, params: options.params });
	const m = mapped(r.document);
	const definitionLines = new Map<string, number[]>();
	r.document.body.forEach((item, i) => {
		if (r.origins[i]?.definitions.length) definitionLines.set(item.id, r.origins[i].definitions.map((d) => d.line));
	});
	return { doc: m.document, warnings: r.warnings.map((w) => `${path}:${w.line}:${w.column}: warning: ${w.message}`), notes: [...r.notes, ...m.notes], definitionLines };
}
