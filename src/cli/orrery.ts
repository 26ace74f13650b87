/**
 * Orrery command line: check, run, count and convert circuits (OpenQASM 2/3 or the JSON
 * document). Thin: reading files and printing; the work is in src/lib/quantum.
 * Exit codes: 0 every input checked meets every spec; 1 some do not; 2 unusable file or arguments.
 * Run through bin/orrery.js (an esbuild bundle of src/cli/entry.ts, rebuilt when stale), or
 * `npx tsx src/cli/entry.ts` while working on it.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { exportQasm } from '../lib/quantum/qasm/export.js';
import { plural } from '../lib/words.js';
import { CliError as UsageError, FILE_OPTIONS, loadCircuitFile, parseArgs as parseCliArgs, readRegisterValues, readOptionsFrom, type Args, type ReadOptions } from './files.js';
import { circuitUnitary, restrictToCleanAncillas, unitaryDistance } from '../lib/quantum/check/equivalence.js';
import { QasmError } from '../lib/quantum/qasm/lexer.js';
import { lowerCircuit } from '../lib/quantum/lower.js';
import { serializeCircuitDocument } from '../lib/quantum/schema.js';
import type { CircuitDocument, LoweredCircuit } from '../lib/quantum/circuit.js';
import { checkCircuit, countResources, SpecError, type CheckReport } from '../lib/quantum/check/index.js';
import type { InputChoice } from '../lib/quantum/check/sweep.js';
import { resetFailureText } from '../lib/quantum/reset-claim.js';
import { runBasisInput, type RunReport } from '../lib/quantum/check/run-input.js';

/** Output sinks, so tests can call {@link main} without a process. */
export interface Io {
	out: (text: string) => void;
	err: (text: string) => void;
	readFile: (path: string) => string;
	writeFile: (path: string, text: string) => void;
}

const nodeIo: Io = {
	out: (t) => process.stdout.write(t.endsWith('\n') ? t : t + '\n'),
	err: (t) => process.stderr.write(t.endsWith('\n') ? t : t + '\n'),
	readFile: (p) => readFileSync(p, 'utf8'),
	writeFile: (p, t) => writeFileSync(p, t)
};


const USAGE = `usage: orrery <command> [options]
  check FILE [--spec "OUT = EXPR" …] [--assume "b < 13" …] [--inputs all|random:N|a=5,b=3]
        [--seed N] [--ignore-phase] [--proof-limit NODES] [--proof-time SECONDS] [--json]
                            sweep the inputs and prove: proved (every input of the domain, values and
                            phase), refuted (with a failing input you can step: see "run"), or
                            undecided (with the reason); a JSON document's own specs and assume
                            are used when no --spec is given
  run FILE --input a=5,b=3 [--engine ledger|amplitudes] [--step N] [--json]
  count FILE [--json]
  convert IN OUT            (.qasm = OpenQASM 2 unless its header says 3, .qasm3 = OpenQASM 3, .json = document)
  equiv A B [--ancilla REG[,REG]] [--json]
                            compare two circuits as unitaries (≤ 10 qubits), up to global phase
  push FILE (--circuit ID --base N | --new "Title") --spec "…" --server URL [--force] [--reviewer EMAIL] [--json]
                            check, add the version, upload the trace, and open a report at the first
                            divergence when it fails; the token comes from ORRERY_TOKEN (push --help)
Reading a file (every command):
  --register NAME=QUBITS    name a register over the file's qubits, listed from its least-significant
                            bit (OpenQASM 3 index syntax): x=q[0:15], x=q[15:-1:0] (MSB first in the
                            file), x=q[{3,1,2,0}], x=x; repeatable; a register mapped in part must be
                            mapped whole (name ancillas too: work=q[16:17])
  --exact-decimals on|off   read printed decimals (0.785398) as the exact k/2^m turn they print (default on)
  --param NAME=VALUE        value of an OpenQASM 3 "input angle NAME;" (or int), e.g. theta=pi/8; repeatable
Registers read little-endian: name[0] is the least-significant bit.`;

const VALUED = new Set(['--spec', '--assume', '--proof-limit', '--proof-time', '--inputs', '--input', '--engine', '--step', '--seed', '--ancilla', ...FILE_OPTIONS]);

/** Most nodes and seconds a proof may take from the command line (the server has its own cap). */
const MAX_PROOF_NODES = 50_000_000;
const MAX_PROOF_SECONDS = 3600;

function proofLimits(args: Args): { maxNodes?: number; timeMs?: number } {
	const out: { maxNodes?: number; timeMs?: number } = {};
	const n = args.flags.get('--proof-limit')?.[0];
	if (n !== undefined) {
		if (!/^\d+$/.test(n) || Number(n) < 100 || Number(n) > MAX_PROOF_NODES) throw new UsageError(`--proof-limit: expected a number of decision-diagram nodes from 100 to ${MAX_PROOF_NODES}, got "${n}"`);
		out.maxNodes = Number(n);
	}
	const t = args.flags.get('--proof-time')?.[0];
	if (t !== undefined) {
		if (!/^\d+(\.\d+)?$/.test(t) || Number(t) <= 0 || Number(t) > MAX_PROOF_SECONDS) throw new UsageError(`--proof-time: expected seconds from 0.001 to ${MAX_PROOF_SECONDS}, got "${t}"`);
		out.timeMs = Math.round(Number(t) * 1000);
	}
	return out;
}
const parseArgs = (argv: string[]) => parseCliArgs(argv, VALUED, new Set(['--ignore-phase']));

/** Read a circuit file by extension / header. */
let readOptions: ReadOptions = {};
const loadDocument = (path: string, io: Io) => loadCircuitFile(path, (p) => io.readFile(p), readOptions);

function lower(doc: CircuitDocument, path: string): LoweredCircuit {
	try {
		return lowerCircuit(doc);
	} catch (e) {
		throw new UsageError(`${path}: ${(e as Error).message}`);
	}
}

function inputChoice(args: Args, c: LoweredCircuit): InputChoice | undefined {
	const v = args.flags.get('--inputs')?.[0];
	const seed = Number(args.flags.get('--seed')?.[0] ?? 1);
	if (!Number.isInteger(seed)) throw new UsageError('--seed must be an integer');
	if (v === undefined) return { mode: 'auto', sample: 1000, seed };
	if (v === 'all') return { mode: 'all' };
	const r = /^random:(\d+)$/.exec(v);
	if (r) return { mode: 'random', count: Math.max(1, Math.min(10_000_000, Number(r[1]))), seed };
	const values = readRegisterValues(v, '--inputs');
	for (const [k, x] of values) {
		const reg = c.registers.find((q) => q.name === k);
		if (!reg) throw new UsageError(`--inputs: unknown register "${k}"; the circuit has ${c.registers.map((q) => q.name).join(', ')}`);
		if (x >= 1n << BigInt(reg.size)) throw new UsageError(`--inputs: ${k}=${x} does not fit in ${reg.size} bits`);
	}
	return { mode: 'given', values };
}

/** The file-reading options as given (register maps, decimals, params), so a suggested command reads the file the same way. */
function readingFlags(args: Args): string {
	const q = (v: string) => (/^[\w.:=,+-]+$/.test(v) ? v : `'${v.replace(/'/g, `'\\''`)}'`);
	return FILE_OPTIONS.flatMap((f) => (args.flags.get(f) ?? []).map((v) => ` ${f} ${q(v)}`)).join('');
}

function printCheck(r: CheckReport, path: string, io: Io, readFlags = ''): void {
	const lines: string[] = [];
	lines.push(`${path}: ${r.ok ? 'PASS' : 'FAIL'} (simulated, not a hardware run)`);
	lines.push(`  specs: ${r.specs.join('; ')}`);
	lines.push(`  inputs: ${r.inputs.registers.join(', ') || '(none)'} (${r.inputs.bits} bits), ${r.cases} checked${r.exhaustive ? (r.domain.conditions.length ? ' (all of the domain)' : ' (all)') : ''}, ${r.failed} failed`);
	lines.push(`  worst-case success probability: ${r.worstSuccessProbability}`);
	lines.push(`  ${r.proof.summary}`);
	if (r.domain.conditions.length) lines.push(`  domain: ${r.domain.conditions.join(' and ')} (${r.domain.count} of ${r.domain.total} basis inputs)`);
	lines.push(`  method: ${r.method}; proof: ${r.proof.status}${r.proof.prover ? ` by the ${r.proof.prover === 'fourier' ? 'Fourier-form' : 'general'} prover` : ''}${r.proof.reason && r.proof.status !== 'undecided' ? ` (${r.proof.reason})` : ''}; phases ${r.phases}`);
	if (r.proof.counterexample) lines.push(`  step it: npm run orrery -- run ${path}${readFlags} --input ${fmt(r.proof.counterexample)}`);
	for (const m of r.proof.bitMismatches.slice(0, 10)) lines.push(`  ${m.qubit} ${m.atStep ? `holds ${m.holds} at step ${m.atStep}` : `ends holding ${m.holds}`}; needs ${m.expected} (e.g. input ${fmt(m.input)}; lines ${m.lines.join(', ') || '–'})`);
	for (const t of r.proof.phaseTerms.slice(0, 10)) lines.push(`  phase term ${t.turns} · ${t.term} on the whole state (lines ${t.lines.join(', ') || '–'})`);
	for (const s of r.proof.sections) lines.push(`  section on ${s.register}: QFT gates ${s.qftGates.join('–')}, inverse ${s.iqftGates.join('–')}, layout ${s.layout}`);
	for (const f of r.failures.slice(0, 10))
		lines.push(
			f.reason === 'phase'
				? `  input ${fmt(f.input)}: right value, but global phase ${f.phase}, unlike the first input`
				: f.reason === 'reset' && f.reset
					? `  input ${fmt(f.input)}: ${resetFailureText(f.reset)}`
					: `  input ${fmt(f.input)}: expected ${fmt(f.expected)}, got ${fmt(f.got)} (probability of the right answer ${f.probability.toPrecision(6)})`
		);
	if (r.failures.length > 10) lines.push(`  … ${r.failed - 10} more failing inputs`);
	for (const w of r.wrongTerms.slice(0, 10))
		lines.push(
			w.where === 'phase'
				? `  phase term ${w.differenceTurns} · ${w.term} on the whole state (lines ${w.lines.join(', ') || '–'})`
				: `  wrong term on ${w.target}: coefficient of ${w.term} is ${w.actualTurns}, expected ${w.expectedTurns} (${w.where}; lines ${w.lines.join(', ') || '–'})`
		);
	for (const m of r.proof.registerMismatches.slice(0, 10)) lines.push(`  ${m.register ? `${m.qubit} ends holding ${m.holds}, expected ${m.expected}` : m.holds}`);
	for (const s of r.suspects.slice(0, 5))
		lines.push(`  suspect: line ${s.line ?? '?'}${s.definitionLines.length ? ` (via gate definition line ${s.definitionLines.join(', ')})` : ''} (gate ${s.gate}, ${s.name} on ${s.qubit}): ${s.reason}`);
	for (const n of r.notes.slice(1)) if (!n.startsWith('domain: ')) lines.push(`  note: ${n}`);
	io.out(lines.join('\n'));
}
const fmt = (o: Record<string, string>) => Object.entries(o).map(([k, v]) => `${k}=${v}`).join(',');

function printRun(r: RunReport, io: Io): void {
	const lines = [`engine: ${r.engine}; after ${r.step} of ${plural(r.gateCount, 'gate')} (simulated, not a hardware run)`];
	if (r.handoverReason) lines.push(`  handed over to the amplitude engine at gate ${r.handedOverAt}: ${r.handoverReason}`);
	if (r.resetFailure) lines.push(`  FAILED CLAIM: ${resetFailureText(r.resetFailure)}; the run went on with the state as it was`);
	if (r.nearClassical)
		lines.push(`  note: ${r.nearClassical.count} H gate${r.nearClassical.count === 1 ? '' : 's'} read an inexact phase within 1e-6 turn of 0 or ½ as a classical bit (probability dropped ≤ ${r.nearClassical.droppedProbability.toExponential(1)})`);
	for (const reg of r.registers) lines.push(`  ${reg.name} = ${reg.values.map((v) => `${v.value} (p=${v.probability.toPrecision(6)})`).join(', ')}`);
	for (const q of r.frames) lines.push(`  ${q.qubit}: ${q.text}`);
	io.out(lines.join('\n'));
}

/** Run one command; returns the exit code (0 ok, 1 check failed, 2 unusable input). */
export function main(argv: string[], io: Io = nodeIo): number {
	let json = false;
	try {
		const args = parseArgs(argv);
		json = args.flags.has('--json');
		readOptions = readOptionsFrom(args);
		const [cmd, ...rest] = args.positional;
		if (!cmd || args.flags.has('--help')) {
			io.out(USAGE);
			return cmd ? 0 : 2;
		}
		switch (cmd) {
			case 'check': {
				if (rest.length !== 1) throw new UsageError('check needs exactly one FILE');
				const given = args.flags.get('--spec') ?? [];
				const { doc, warnings, notes, definitionLines } = loadDocument(rest[0], io);
				// Without --spec the document speaks for itself: its specs, and the domain they hold on.
				const own = given.length === 0;
				const specs = own ? (doc.specs ?? []) : given;
				if (!specs.length) throw new UsageError(`check needs at least one --spec "OUT = EXPR"; ${rest[0]} states no specs of its own`);
				const assume = [...(own ? (doc.assume ?? []) : []), ...(args.flags.get('--assume') ?? [])];
				const c = lower(doc, rest[0]);
				let r: ReturnType<typeof checkCircuit>;
				try {
					r = checkCircuit(c, specs, { inputs: inputChoice(args, c), definitionLines, assume, ignorePhase: args.flags.has('--ignore-phase'), proofLimits: proofLimits(args) });
				} catch (e) {
					if (own && e instanceof SpecError) throw new UsageError(`${rest[0]}: ${e.message}`);
					if (e instanceof SpecError && !specs.includes(e.spec)) throw new UsageError(`--assume: ${e.message}`);
					throw e;
				}
				if (!json) for (const w of warnings) io.err(w);
				if (json) io.out(JSON.stringify({ ...r, importNotes: notes }, null, 2));
				else {
					printCheck(r, rest[0], io, readingFlags(args));
					for (const n of notes) io.out(`  read: ${n}`);
				}
				return r.ok ? 0 : 1;
			}
			case 'run': {
				if (rest.length !== 1) throw new UsageError('run needs exactly one FILE');
				const input = args.flags.get('--input')?.[0];
				const { doc } = loadDocument(rest[0], io);
				const c = lower(doc, rest[0]);
				const values = input ? readRegisterValues(input, '--input') : new Map<string, bigint>();
				for (const k of values.keys()) if (!c.registers.some((r) => r.name === k)) throw new UsageError(`--input: unknown register "${k}"`);
				const engine = (args.flags.get('--engine')?.[0] ?? 'ledger') as 'ledger' | 'amplitudes';
				if (engine !== 'ledger' && engine !== 'amplitudes') throw new UsageError('--engine must be ledger or amplitudes');
				const stepText = args.flags.get('--step')?.[0];
				const step = stepText === undefined ? c.gateCount : Number(stepText);
				if (!Number.isInteger(step) || step < 0 || step > c.gateCount) throw new UsageError(`--step must be an integer 0..${c.gateCount}`);
				const r = runBasisInput(c, values, { engine, step });
				if (json) io.out(JSON.stringify(r, null, 2));
				else printRun(r, io);
				return 0;
			}
			case 'count': {
				if (rest.length !== 1) throw new UsageError('count needs exactly one FILE');
				const { doc } = loadDocument(rest[0], io);
				const r = countResources(lower(doc, rest[0]));
				if (json) io.out(JSON.stringify(r, null, 2));
				else
					io.out(
						[
							`qubits: ${r.qubits}`,
							`gates: ${r.gates} (${Object.entries(r.byKind).map(([k, v]) => `${k} ${v}`).join(', ')})`,
							`rotations: ${Object.entries(r.rotations).map(([k, v]) => `${k} ${v}`).join(', ') || 'none'}   (R_k = 2π/2^k)`,
							`depth: ${r.depth}`,
							`two-qubit gates: ${r.twoQubitGates}; gates on 3+ qubits: ${r.multiQubitGates}`
						].join('\n')
					);
				return 0;
			}
			case 'equiv': {
				// Two circuits as unitaries, up to global phase; --ancilla names registers of the
				// second that must start and end in |0⟩ (a lowering with an extra qubit).
				if (rest.length !== 2) throw new UsageError('equiv needs two FILEs');
				const a = lower(loadDocument(rest[0], io).doc, rest[0]);
				const b = lower(loadDocument(rest[1], io).doc, rest[1]);
				const anc = (args.flags.get('--ancilla') ?? []).flatMap((x) => x.split(','));
				const ancQubits = anc.flatMap((name) => {
					const r = b.registers.find((x) => x.name === name);
					if (!r) throw new UsageError(`--ancilla: ${rest[1]} has no register "${name}"`);
					return Array.from({ length: r.size }, (_, i) => r.offset + i);
				});
				if (a.qubitCount !== b.qubitCount - ancQubits.length)
					throw new UsageError(`${rest[0]} has ${a.qubitCount} qubits and ${rest[1]} has ${b.qubitCount}${ancQubits.length ? ` (${ancQubits.length} of them ancillas)` : ''}; they must match`);
				const unitaryOf = (c: LoweredCircuit, file: string) => {
					try {
						return circuitUnitary(c);
					} catch (e) {
						if (e instanceof RangeError) throw new UsageError(`${file}: ${e.message}`);
						throw e;
					}
				};
				const ua = unitaryOf(a, rest[0]);
				const { unitary: ub, leak } = restrictToCleanAncillas(unitaryOf(b, rest[1]), ancQubits);
				const distance = unitaryDistance(ua, ub);
				const ok = distance <= 1e-9 && leak <= 1e-9;
				if (json) io.out(JSON.stringify({ ok, distance, ancillaLeak: leak, qubits: a.qubitCount, note: 'compared as unitaries up to global phase; simulated, not a hardware run' }));
				else
					io.out(
						`${ok ? 'equivalent' : 'NOT equivalent'} up to global phase: largest entry difference ${distance.toExponential(2)}` +
							(ancQubits.length ? `; ancilla leak ${leak.toExponential(2)}` : '') +
							` (${a.qubitCount} qubits, simulated)`
					);
				return ok ? 0 : 1;
			}
			case 'convert': {
				if (rest.length !== 2) throw new UsageError('convert needs IN and OUT');
				const [inp, outp] = rest;
				const { doc } = loadDocument(inp, io);
				const lo = outp.toLowerCase();
				if (lo.endsWith('.json')) io.writeFile(outp, serializeCircuitDocument(doc) + '\n');
				else if (lo.endsWith('.qasm3')) io.writeFile(outp, exportQasm(lower(doc, inp), { version: 3 }));
				else if (lo.endsWith('.qasm')) io.writeFile(outp, exportQasm(lower(doc, inp), { version: 2 }));
				else throw new UsageError(`${outp}: unknown output type; expected .qasm (OpenQASM 2), .qasm3 (OpenQASM 3) or .json`);
				if (!json) io.out(`wrote ${outp}`);
				return 0;
			}
			default:
				throw new UsageError(`unknown command "${cmd}"\n${USAGE}`);
		}
	} catch (e) {
		const msg = e instanceof QasmError || e instanceof UsageError ? e.message : e instanceof SpecError ? `--spec: ${e.message}` : e instanceof RangeError ? e.message : null;
		if (msg === null) throw e;
		if (json) io.out(JSON.stringify({ ok: false, error: msg }));
		io.err(msg);
		return 2;
	}
}
