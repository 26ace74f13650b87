import { describe, expect, it } from 'vitest';
import { runPush, type PushIo } from './push';
import { plantedFaultAdder } from '../lib/quantum/templates';

// The push command against a recorded fake server: what it sends and what it exits with. The
// circuit is the invented demo adder with its planted fault (rotation c·a[1] → b[3] at pi/8).

function fakeIo(doc: unknown) {
	const sent: { method: string; path: string; body: unknown; auth: string | null }[] = [];
	const out: string[] = [];
	const io: PushIo = {
		out: (t) => out.push(t),
		err: (t) => out.push(`ERR ${t}`),
		readFile: () => JSON.stringify(doc),
		fetch: (async (url: URL, init: RequestInit) => {
			const path = url.pathname;
			const body = init.body ? JSON.parse(String(init.body)) : undefined;
			sent.push({ method: init.method ?? 'GET', path, body, auth: new Headers(init.headers).get('authorization') });
			const reply = (status: number, json: unknown) => new Response(JSON.stringify(json), { status, headers: { 'content-type': 'application/json' } });
			if (path === '/api/me') return reply(200, { teams: [{ slug: 'lab' }] });
			if (path === '/api/teams/lab/traces') return reply(201, { id: 't'.repeat(24), links: { replay: '/teams/lab/traces/x/replay' } });
			if (path.startsWith('/api/teams/lab/traces/')) return reply(200, { trace: { firstDivergence: { step: 13 }, lastStep: 30 } });
			if (path === '/api/teams/lab/reports') return reply(201, { id: 'r'.repeat(24), links: { page: '/teams/lab/reports/r', replay: '/x' } });
			return reply(404, { error: { message: 'no such route' } });
		}) as unknown as typeof fetch
	};
	return { io, sent, out };
}

const args = (spec: string) => ['adder.json', '--spec', spec, '--server', 'http://orrery.test', '--token', 'orr_test', '--json'];

describe('orrery push', () => {
	it('uploads the trace at the first failing input and opens a report at the divergence; exit 1', async () => {
		const { io, sent, out } = fakeIo(plantedFaultAdder());
		expect(await runPush(args('b = b + c*a mod 16'), io)).toBe(1);
		expect(sent.map((s) => `${s.method} ${s.path}`)).toEqual(['GET /api/me', 'POST /api/teams/lab/traces', `GET /api/teams/lab/traces/${'t'.repeat(24)}`, 'POST /api/teams/lab/reports']);
		expect(sent.every((s) => s.auth === 'Bearer orr_test')).toBe(true);
		const trace = sent[1].body as { document: { specs: string[] }; inputs: { values: Record<string, string> } };
		expect(trace.document.specs).toContain('b = b + c*a mod 16');
		// The fault needs c=1 and a[1]=1, so the first failing input has both.
		expect(trace.inputs.values.c).toBe('1');
		expect((BigInt(trace.inputs.values.a) >> 1n) & 1n).toBe(1n);
		const report = sent[3].body as { step: number; severity: string; description: string };
		expect(report.step).toBe(13);
		expect(report.severity).toBe('high');
		expect(report.description).toContain('fail');
		expect(JSON.parse(out[0])).toMatchObject({ ok: false, report: { id: 'r'.repeat(24), page: 'http://orrery.test/teams/lab/reports/r' } });
	});

	it('opens no report when the circuit meets its spec; exit 0', async () => {
		const fixed = plantedFaultAdder();
		fixed.body = fixed.body.map((i) => (i.id === 'rot-b3-a1' ? { ...i, angle: 'pi/4' } : i)) as typeof fixed.body;
		const { io, sent } = fakeIo(fixed);
		expect(await runPush(args('b = b + c*a mod 16'), io)).toBe(0);
		expect(sent.map((s) => s.path)).not.toContain('/api/teams/lab/reports');
	});

	it('exits 2 with a sentence when the token or the spec is missing', async () => {
		delete process.env.ORRERY_TOKEN;
		const { io, out } = fakeIo(plantedFaultAdder());
		expect(await runPush(['adder.json', '--spec', 'b = b + c*a mod 16', '--server', 'http://orrery.test'], { ...io, out: () => {} })).toBe(2);
		expect(out.at(-1)).toContain('--token');
		expect(await runPush(['adder.json', '--server', 'http://orrery.test', '--token', 'x'], io)).toBe(2);
	});
});
