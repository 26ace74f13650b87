/**
 * `orrery push FILE --spec "OUT = EXPR" --server URL --token T`: check the circuit here (the
 * same checker as `orrery check`), upload the run as a trace (the server recomputes it and
 * keeps the keyframe checksums), and open a report when a spec fails, at the first divergence.
 * Exit codes: 0 the circuit meets every spec; 1 it does not (a report was opened); 2 unusable
 * file, arguments, or the server refused. Everything is exact classical simulation.
 */
import { readFileSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { CliError as PushError, FILE_OPTIONS, loadCircuitFile, parseArgs, readOptionsFrom, type ReadOptions } from './files.js';
import { QasmError } from '../lib/quantum/qasm/lexer.js';
import { lowerCircuit } from '../lib/quantum/lower.js';
import type { CircuitDocument } from '../lib/quantum/circuit.js';
import { checkCircuit, SpecError, type CheckReport } from '../lib/quantum/check/index.js';
import type { InputChoice } from '../lib/quantum/check/sweep.js';

export interface PushIo {
	out: (text: string) => void;
	err: (text: string) => void;
	readFile: (path: string) => string;
	fetch: typeof fetch;
}

const nodeIo: PushIo = {
	out: (t) => process.stdout.write(t.endsWith('\n') ? t : t + '\n'),
	err: (t) => process.stderr.write(t.endsWith('\n') ? t : t + '\n'),
	readFile: (p) => readFileSync(p, 'utf8'),
	fetch: (...a) => fetch(...a)
};

export const PUSH_USAGE = `usage: orrery push FILE --spec "OUT = EXPR" [--spec …] --server URL --token T
       [--inputs all|random:N] [--seed N] [--input a=5,b=3] [--title TEXT] [--severity low|medium|high|critical] [--json]
  --input   the inputs of the uploaded trace (default: the first failing input, else all zeros)
  --token   an API token of the team (made on the team's API tokens page; ORRERY_TOKEN also works)`;


type Flags = Map<string, string[]>;
const VALUED = new Set(['--spec', '--server', '--token', '--inputs', '--seed', '--input', '--title', '--severity', ...FILE_OPTIONS]);
function parse(argv: string[]): { file: string; flags: Flags } {
	const { positional, flags } = parseArgs(argv, VALUED);
	if (flags.has('--help')) return { file: '', flags };
	if (positional.length !== 1) throw new PushError('push needs exactly one FILE');
	return { file: positional[0], flags };
}

function values(text: string, what: string): Map<string, bigint> {
	const m = new Map<string, bigint>();
	for (const part of text.split(',').filter(Boolean)) {
		const mm = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(0x[0-9a-fA-F]+|0b[01]+|\d+)\s*$/.exec(part);
		if (!mm) throw new PushError(`${what}: expected name=value pairs such as a=5,b=3, got "${part}"`);
		m.set(mm[1], BigInt(mm[2]));
	}
	return m;
}

function loadDocument(path: string, io: PushIo, options: ReadOptions): CircuitDocument {
	return loadCircuitFile(path, (p) => io.readFile(p), options).doc;
}

async function call<T>(io: PushIo, server: string, token: string, path: string, body?: unknown): Promise<T> {
	let res: Response;
	try {
		res = await io.fetch(new URL(path, server), {
			method: body === undefined ? 'GET' : 'POST',
			headers: { authorization: `Bearer ${token}`, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
			body: body === undefined ? undefined : JSON.stringify(body)
		});
	} catch (e) {
		throw new PushError(`cannot reach ${server}: ${(e as Error).message}`);
	}
	const json = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
	if (!res.ok) throw new PushError(`${path}: the server answered ${res.status}: ${json?.error?.message ?? res.statusText}`);
	return json as T;
}

/** The markdown description of a failing check (what failed, the wrong terms, the suspects). */
export function describeFailure(r: CheckReport, file: string): string {
	const lines = [`\`orrery push\` checked **${file}** against ${r.specs.map((s) => `\`${s}\``).join(', ')}: ${r.failed} of ${r.cases} input${r.cases === 1 ? '' : 's'} fail (${r.method}; exact simulation, not a hardware run).`, ''];
	const fmt = (o: Record<string, string>) => Object.entries(o).map(([k, v]) => `${k}=${v}`).join(', ');
	for (const f of r.failures.slice(0, 5)) lines.push(`- input ${fmt(f.input)}: expected ${fmt(f.expected)}, got ${fmt(f.got)}`);
	for (const w of r.wrongTerms.slice(0, 5)) lines.push(`- wrong term on ${w.target}: coefficient of ${w.term} is ${w.actualTurns}, expected ${w.expectedTurns}`);
	for (const s of r.suspects.slice(0, 5)) lines.push(`- suspect: gate ${s.gate} (${s.kind} on ${s.qubit})${s.line ? `, line ${s.line}` : ''}: ${s.reason}`);
	return lines.join('\n');
}

/** Run `push` with its arguments (after the word "push"); resolves to the exit code. */
export async function runPush(argv: string[], io: PushIo = nodeIo): Promise<number> {
	let json = false;
	try {
		const { file, flags } = parse(argv);
		json = flags.has('--json');
		if (flags.has('--help')) return io.out(PUSH_USAGE), 0;
		const specs = flags.get('--spec') ?? [];
		if (!specs.length) throw new PushError('push needs at least one --spec "OUT = EXPR"');
		const server = flags.get('--server')?.[0];
		const token = flags.get('--token')?.[0] ?? process.env.ORRERY_TOKEN;
		if (!server) throw new PushError('push needs --server URL (the Orrery site, e.g. https://orrery.example)');
		if (!token) throw new PushError('push needs --token T (or ORRERY_TOKEN): an API token of the team');

		const doc = loadDocument(file, io, readOptionsFrom({ positional: [file], flags }));
		doc.specs = [...new Set([...(doc.specs ?? []), ...specs])];
		const c = lowerCircuit(doc);
		const given = flags.get('--inputs')?.[0];
		const seed = Number(flags.get('--seed')?.[0] ?? 1);
		const choice: InputChoice =
			given === 'all' ? { mode: 'all' } : given && /^random:\d+$/.test(given) ? { mode: 'random', count: Number(given.slice(7)), seed } : { mode: 'auto', sample: 1000, seed };
		const report = checkCircuit(c, specs, { inputs: choice });

		const inputText = flags.get('--input')?.[0];
		const traceValues: Record<string, string> = inputText
			? Object.fromEntries([...values(inputText, '--input')].map(([k, v]) => [k, v.toString()]))
			: (report.failures[0]?.input ?? {});
		for (const k of Object.keys(traceValues)) if (!c.registers.some((r) => r.name === k)) throw new PushError(`--input: unknown register "${k}"`);

		const me = await call<{ teams: { slug: string }[] }>(io, server, token, '/api/me');
		const slug = me.teams[0]?.slug;
		if (!slug) throw new PushError('the token is not bound to a team');
		const trace = await call<{ id: string; links: { replay: string } }>(io, server, token, `/api/teams/${encodeURIComponent(slug)}/traces`, {
			document: doc,
			inputs: { values: traceValues, superposed: [] },
			label: `push: ${file}`.slice(0, 160)
		});
		const saved = await call<{ trace: { firstDivergence: { step: number } | null; lastStep: number } }>(io, server, token, `/api/teams/${encodeURIComponent(slug)}/traces/${trace.id}`);
		let opened: { id: string; links: { page: string; replay: string } } | null = null;
		if (!report.ok) {
			const step = saved.trace.firstDivergence?.step ?? saved.trace.lastStep;
			const severity = flags.get('--severity')?.[0] ?? 'high';
			opened = await call(io, server, token, `/api/teams/${encodeURIComponent(slug)}/reports`, {
				traceId: trace.id,
				step,
				title: (flags.get('--title')?.[0] ?? `${doc.title}: fails ${specs.join('; ')}`).slice(0, 160),
				description: describeFailure(report, file),
				severity
			});
		}
		const abs = (p: string) => new URL(p, server).toString();
		if (json) io.out(JSON.stringify({ ok: report.ok, cases: report.cases, failed: report.failed, trace: { id: trace.id, replay: abs(trace.links.replay) }, report: opened ? { id: opened.id, page: abs(opened.links.page) } : null }, null, 2));
		else {
			io.out(`${file}: ${report.ok ? 'PASS' : 'FAIL'} — ${report.cases} input${report.cases === 1 ? '' : 's'} checked, ${report.failed} failed (simulated, not a hardware run)`);
			io.out(`  trace: ${abs(trace.links.replay)}`);
			if (opened) io.out(`  report: ${abs(opened.links.page)}`);
		}
		return report.ok ? 0 : 1;
	} catch (e) {
		const msg = e instanceof PushError || e instanceof QasmError ? e.message : e instanceof SpecError ? `--spec: ${e.message}` : e instanceof RangeError ? e.message : null;
		if (msg === null) throw e;
		if (json) io.out(JSON.stringify({ ok: false, error: msg }));
		io.err(msg);
		return 2;
	}
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) void runPush(process.argv.slice(2)).then((code) => (process.exitCode = code));
