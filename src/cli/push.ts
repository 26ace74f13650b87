/**
 * `orrery push FILE (--circuit ID --base N | --new "Title") --spec "OUT = EXPR" --server URL`:
 * check the circuit here (the same checker as `orrery check`), add it to the named circuit (a
 * push based on a version that is no longer the latest is refused, naming both, unless --force)
 * or make a new one, upload a run as a trace (the server recomputes it, finds its first
 * divergence and keeps the keyframe checksums), and when a spec fails open a report at that
 * divergence. Exit codes: 0 the circuit meets every spec; 1 it does not (a report was opened);
 * 2 unusable file, arguments, or the server refused. Everything is exact classical simulation.
 */
import { readFileSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { CliError as PushError, FILE_OPTIONS, loadCircuitFile, parseArgs, readOptionsFrom, readRegisterValues, type ReadOptions } from './files.js';
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

export const PUSH_USAGE = `usage: orrery push FILE (--circuit ID --base N | --new "Title") --spec "OUT = EXPR" [--spec …] --server URL
       [--force] [--reviewer EMAIL] [--assignee EMAIL] [--inputs all|random:N] [--seed N] [--input a=5,b=3]
       [--title TEXT] [--severity low|medium|high|critical] [--json]
  --circuit ID  add FILE as a new version of this circuit (the id is in the circuit's address)
  --base N      the version FILE was edited from; if someone saved a newer one since, the push is
                refused and names both versions
  --force       add FILE on top of the latest version even when it is newer than --base
  --new TITLE   make a new circuit with this title instead
  --reviewer, --assignee  team members (by e-mail) the report names; they get a mail
  --input       the inputs of the uploaded trace (default: the first failing input, else all zeros)
  --token T     an API token of the team (made on the team's API tokens page). Prefer the
                environment variable ORRERY_TOKEN: a flag is visible in the process list.

Exit codes: 0 every spec holds, 1 a spec fails (a report was opened), 2 unusable input or refused.

In CI (the token kept as a secret in ORRERY_TOKEN):
  ORRERY_TOKEN=\${{ secrets.ORRERY_TOKEN }} npm run orrery -- push circuits/adder.json \\
    --circuit 7kq3… --base 4 --spec "b = b + c*a mod 16" --server https://orrery.example --reviewer lead@example.org`;

type Flags = Map<string, string[]>;
const VALUED = new Set(['--spec', '--server', '--token', '--inputs', '--seed', '--input', '--title', '--severity', '--circuit', '--base', '--new', '--reviewer', '--assignee', ...FILE_OPTIONS]);
const SWITCHES = new Set(['--force']);
/** Options that make sense once; --spec and the file-reading options repeat. */
const ONCE = ['--server', '--token', '--inputs', '--seed', '--input', '--title', '--severity', '--circuit', '--base', '--new', '--reviewer', '--assignee'];
function parse(argv: string[]): { file: string; flags: Flags } {
	const { positional, flags } = parseArgs(argv, VALUED, SWITCHES);
	if (flags.has('--help')) return { file: '', flags };
	if (positional.length !== 1) throw new PushError('push needs exactly one FILE');
	for (const k of ONCE) if ((flags.get(k)?.length ?? 0) > 1) throw new PushError(`${k} is given ${flags.get(k)!.length} times; give it once`);
	return { file: positional[0], flags };
}

type Target = { circuitId: string; baseVersion?: number; force: boolean } | { newTitle: string };

/** Where the push goes: named explicitly, never guessed from the file name or title. */
export function pushTarget(flags: Flags): Target {
	const circuit = flags.get('--circuit')?.[0];
	const title = flags.get('--new')?.[0];
	const baseText = flags.get('--base')?.[0];
	const force = flags.has('--force');
	if (circuit && title !== undefined) throw new PushError('give --circuit ID (a new version of that circuit) or --new "Title" (a new circuit), not both');
	if (title !== undefined) {
		if (baseText || force) throw new PushError('--base and --force go with --circuit, not with --new');
		if (!title.trim()) throw new PushError('--new needs a title');
		return { newTitle: title.trim().slice(0, 120) };
	}
	if (!circuit) throw new PushError('push needs a target: --circuit ID --base N (a new version of that circuit) or --new "Title" (a new circuit)');
	if (!/^[a-z2-7]{24}$/.test(circuit)) throw new PushError(`--circuit: "${circuit}" is not a circuit id (24 letters and digits, from the circuit's address)`);
	if (baseText === undefined) {
		if (!force) throw new PushError('--circuit needs --base N: the version FILE was edited from (an exported file is named …-vN), or --force to add it on top of whatever is latest');
		return { circuitId: circuit, force };
	}
	if (!/^\d+$/.test(baseText) || Number(baseText) < 1) throw new PushError(`--base: expected a version number such as 3, got "${baseText}"`);
	return { circuitId: circuit, baseVersion: Number(baseText), force };
}

function loadDocument(path: string, io: PushIo, options: ReadOptions): CircuitDocument {
	return loadCircuitFile(path, (p) => io.readFile(p), options).doc;
}

class Refused extends PushError {}

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
	if (res.status === 409) throw new Refused(`refused: ${json?.error?.message ?? 'the circuit changed since your version'}`);
	if (!res.ok) throw new PushError(`${path}: the server answered ${res.status}: ${json?.error?.message ?? res.statusText}`);
	return json as T;
}

/** The markdown description of a failing check (what failed, the wrong terms, the suspects). */
export function describeFailure(r: CheckReport, file: string): string {
	const lines = [`\`orrery push\` checked **${file}** against ${r.specs.map((s) => `\`${s}\``).join(', ')}: ${r.failed} of ${r.cases} input${r.cases === 1 ? '' : 's'} fail (${r.method}; exact simulation, not a hardware run).`, ''];
	const fmt = (o: Record<string, string>) => Object.entries(o).map(([k, v]) => `${k}=${v}`).join(', ');
	for (const f of r.failures.slice(0, 5)) lines.push(`- input ${fmt(f.input)}: expected ${fmt(f.expected)}, got ${fmt(f.got)}`);
	for (const w of r.wrongTerms.slice(0, 5)) lines.push(`- wrong term on ${w.target}: coefficient of ${w.term} is ${w.actualTurns}, expected ${w.expectedTurns}`);
	for (const s of r.suspects.slice(0, 5)) lines.push(`- suspect: gate ${s.gate} (${s.name} on ${s.qubit})${s.line ? `, line ${s.line}` : ''}: ${s.reason}`);
	return lines.join('\n');
}

type TraceAnswer = {
	id: string;
	circuit: { id: string; version: number; addedVersion: boolean };
	firstDivergence: { step: number; label: string; message: string } | null;
	lastStep: number;
	links: { replay: string; circuit: string };
};

/** Run `push` with its arguments (after the word "push"); resolves to the exit code. */
export async function runPush(argv: string[], io: PushIo = nodeIo, env: Record<string, string | undefined> = process.env): Promise<number> {
	let json = false;
	try {
		const { file, flags } = parse(argv);
		json = flags.has('--json');
		if (flags.has('--help')) return io.out(PUSH_USAGE), 0;
		const specs = flags.get('--spec') ?? [];
		if (!specs.length) throw new PushError('push needs at least one --spec "OUT = EXPR"');
		const target = pushTarget(flags);
		const server = flags.get('--server')?.[0];
		const token = flags.get('--token')?.[0] ?? env.ORRERY_TOKEN;
		if (!server) throw new PushError('push needs --server URL (the Orrery site, e.g. https://orrery.example)');
		if (!token) throw new PushError('push needs an API token of the team: set ORRERY_TOKEN (or pass --token T)');
		const severity = flags.get('--severity')?.[0] ?? 'high';
		if (!['low', 'medium', 'high', 'critical'].includes(severity)) throw new PushError(`--severity: expected low, medium, high or critical, got "${severity}"`);

		const doc = loadDocument(file, io, readOptionsFrom({ positional: [file], flags }));
		doc.specs = [...new Set([...(doc.specs ?? []), ...specs])];
		if ('newTitle' in target) doc.title = target.newTitle;
		const c = lowerCircuit(doc);
		const given = flags.get('--inputs')?.[0];
		const seed = Number(flags.get('--seed')?.[0] ?? 1);
		const choice: InputChoice =
			given === 'all' ? { mode: 'all' } : given && /^random:\d+$/.test(given) ? { mode: 'random', count: Number(given.slice(7)), seed } : { mode: 'auto', sample: 1000, seed };
		const report = checkCircuit(c, specs, { inputs: choice, assume: doc.assume });

		const inputText = flags.get('--input')?.[0];
		const traceValues: Record<string, string> = inputText
			? Object.fromEntries([...readRegisterValues(inputText, '--input')].map(([k, v]) => [k, v.toString()]))
			: (report.failures[0]?.input ?? {});
		for (const k of Object.keys(traceValues)) if (!c.registers.some((r) => r.name === k)) throw new PushError(`--input: unknown register "${k}"`);

		const me = await call<{ teams: { slug: string }[] }>(io, server, token, '/api/me');
		const slug = me.teams[0]?.slug;
		if (!slug) throw new PushError('the token is not bound to a team');
		const team = `/api/teams/${encodeURIComponent(slug)}`;
		const people: { assigneeId?: string; reviewerId?: string } = {};
		const named = { assignee: flags.get('--assignee')?.[0], reviewer: flags.get('--reviewer')?.[0] };
		if (named.assignee || named.reviewer) {
			const { members } = await call<{ members: { id: string; email: string }[] }>(io, server, token, `${team}/members`);
			for (const part of ['assignee', 'reviewer'] as const) {
				const email = named[part]?.toLowerCase();
				if (!email) continue;
				const m = members.find((x) => x.email.toLowerCase() === email);
				if (!m) throw new PushError(`--${part}: ${email} is not a member of the team`);
				people[`${part}Id`] = m.id;
			}
		}

		const trace = await call<TraceAnswer>(io, server, token, `${team}/traces`, {
			document: doc,
			inputs: { values: traceValues, superposed: [] },
			label: `push: ${file}`.slice(0, 160),
			...target
		});
		// The verdict is the server's: the trace upload queues its own check of the pushed (or matched)
		// version from the document's specs; this command's result only decides the exit code and the report.
		let opened: { id: string; links: { page: string; replay: string } } | null = null;
		const d = trace.firstDivergence;
		if (!report.ok) {
			const where = d
				? `\n\nThe server's run of the uploaded input first departs from the expected angles at step ${d.step} on ${d.label}: ${d.message}`
				: `\n\nThe server's run of the uploaded input stays on its expected angles at every step it can check, so the report sits at the last step.`;
			opened = await call(io, server, token, `${team}/reports`, {
				traceId: trace.id,
				step: d?.step ?? trace.lastStep,
				title: (flags.get('--title')?.[0] ?? `${doc.title}: fails ${specs.join('; ')}`).slice(0, 160),
				description: describeFailure(report, file) + where,
				severity,
				...people
			});
		}
		const abs = (p: string) => new URL(p, server).toString();
		const circuitLine = `${trace.circuit.addedVersion ? 'added as' : 'same as'} version ${trace.circuit.version} of circuit ${trace.circuit.id} (next push: --circuit ${trace.circuit.id} --base ${trace.circuit.version})`;
		if (json)
			io.out(
				JSON.stringify(
					{
						ok: report.ok,
						cases: report.cases,
						failed: report.failed,
						circuit: { id: trace.circuit.id, version: trace.circuit.version, addedVersion: trace.circuit.addedVersion, page: abs(trace.links.circuit) },
						trace: { id: trace.id, replay: abs(trace.links.replay), firstDivergence: d },
						report: opened ? { id: opened.id, page: abs(opened.links.page), replay: abs(opened.links.replay) } : null
					},
					null,
					2
				)
			);
		else {
			io.out(`${file}: ${report.ok ? 'PASS' : 'FAIL'} — ${report.cases} input${report.cases === 1 ? '' : 's'} checked, ${report.failed} failed (simulated, not a hardware run)`);
			io.out(`  circuit: ${circuitLine}`);
			io.out(`  trace: ${abs(trace.links.replay)}`);
			if (d) io.out(`  first divergence: step ${d.step} on ${d.label}`);
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
